import { Router } from 'express';
import { requireScopeOrUser } from '../auth/guards';
import type { EditionCatalog } from '../editions/edition-catalog';
import { cachePolicy } from '../http/caching';
import { identify, type IdentifyRequest } from './identify-service';

/** POST /identify: a partner key with the identify scope, or any signed-in user. */
export function identifyRoutes(editions: EditionCatalog): Router {
  const router = Router();
  router.post('/', requireScopeOrUser('identify'), async (req, res) => {
    const answer = await identify(editions, req.body as IdentifyRequest);
    cachePolicy.noStore(res);
    res.json(answer);
  });
  return router;
}
