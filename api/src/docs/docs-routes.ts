import { Router } from 'express';
import swaggerUi from 'swagger-ui-express';
import { loadOpenApiDocument } from './openapi-document';

/** Swagger UI at /api/docs and the raw contract at /api/openapi.json. */
export function docsRoutes(): Router {
  const router = Router();
  const document = loadOpenApiDocument();
  router.get('/openapi.json', (_req, res) => {
    res.set('Cache-Control', 'public, max-age=300').json(document);
  });
  router.use('/docs', swaggerUi.serve, swaggerUi.setup(document, { customSiteTitle: 'Sylvasift API', swaggerOptions: { persistAuthorization: true } }));
  return router;
}
