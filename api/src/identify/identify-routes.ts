import { Router, type ErrorRequestHandler } from 'express';
import { requireScopeOrUser } from '../auth/guards';
import type { EditionCatalog } from '../editions/edition-catalog';
import { cachePolicy } from '../http/caching';
import { sendJsonBytes } from '../http/json-bytes';
import { IdentifyBusy, type IdentifyPool } from './identify-pool';
import type { IdentifyRequest } from './identify-answer';
import { identifyService } from './identify-service';

export interface IdentifyRouteOptions {
  /** answer on worker threads; without it, on the request thread */
  pool?: IdentifyPool;
  /** the answer goes out through res.json so the response check in openapi-validation.ts sees it */
  validateResponses: boolean;
}

/** A busy pool answers 503 with Retry-After; the problem itself is written by the app's error handler. */
const retryAfterWhenBusy: ErrorRequestHandler = (error, _req, res, next) => {
  if (error instanceof IdentifyBusy) res.set('Retry-After', String(error.retryAfterSeconds));
  next(error);
};

/** POST /identify: a partner key with the identify scope, or any signed-in user. */
export function identifyRoutes(editions: EditionCatalog, options: IdentifyRouteOptions): Router {
  const sifts = identifyService({ editions, pool: options.pool });
  const router = Router();
  router.post('/', requireScopeOrUser('identify'), async (req, res) => {
    const body = await sifts.identify(req.body as IdentifyRequest);
    cachePolicy.noStore(res);
    if (options.validateResponses) res.json(JSON.parse(Buffer.from(body.buffer, body.byteOffset, body.byteLength).toString('utf8')));
    else sendJsonBytes(res, body);
  });
  router.use(retryAfterWhenBusy);
  return router;
}
