import { Router } from 'express';
import type { EditionCatalog } from '../editions/edition-catalog';
import { cachePolicy } from '../http/caching';
import { compareTaxa, type CompareRequest } from './compare-service';

/** POST /compare: Side by side of 2–4 published taxa. Public; partner keys need `lookup`. */
export function compareRoutes(editions: EditionCatalog): Router {
  const router = Router();
  router.post('/', async (req, res) => {
    const comparison = await compareTaxa(editions, req.body as CompareRequest);
    cachePolicy.noStore(res);
    res.json(comparison);
  });
  return router;
}
