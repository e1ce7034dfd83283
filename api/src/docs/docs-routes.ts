import { Router } from 'express';
import swaggerUi from 'swagger-ui-express';
import { problemPages } from '../http/problem-pages';
import { loadOpenApiDocument } from './openapi-document';

/** Swagger UI at /api/docs, the raw contract at /api/openapi.json, and the problem type pages at /api/problems. */
export function docsRoutes(): Router {
  const router = Router();
  const document = loadOpenApiDocument();
  router.get('/openapi.json', (_req, res) => {
    res.set('Cache-Control', 'public, max-age=300').json(document);
  });
  router.use('/problems', problemPages());
  router.use('/docs', swaggerUi.serve, swaggerUi.setup(document, { customSiteTitle: 'Sylvasift API', swaggerOptions: { persistAuthorization: true } }));
  return router;
}
