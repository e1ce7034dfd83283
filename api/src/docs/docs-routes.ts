import { Router } from 'express';
import swaggerUi from 'swagger-ui-express';
import type { OpenAPIV3_1 } from 'openapi-types';
import { problemPages } from '../http/problem-pages';

/** Swagger UI at /api/docs, the raw contract at /api/openapi.json, and the problem type pages at /api/problems. */
export function docsRoutes(document: OpenAPIV3_1.Document): Router {
  const router = Router();
  router.get('/openapi.json', (_req, res) => {
    res.set('Cache-Control', 'public, max-age=300').json(document);
  });
  router.use('/problems', problemPages());
  router.use('/docs', swaggerUi.serve, swaggerUi.setup(document, { customSiteTitle: 'Sylvasift API', swaggerOptions: { persistAuthorization: true } }));
  return router;
}
