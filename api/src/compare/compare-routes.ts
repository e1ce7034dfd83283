import { Router } from 'express';
import type { EditionCatalog } from '../editions/edition-catalog';
import { cachePolicy } from '../http/caching';
import { compareService, type CompareRequest } from './compare-service';

/** POST /compare: Side by side of 2–4 published taxa. Public; partner keys need `lookup`. */
export function compareRoutes(editions: EditionCatalog): Router {
  const comparisons = compareService(editions);
  const router = Router();
  router.post('/', async (req, res) => {
    const comparison = await comparisons.compare(req.body as CompareRequest);
    cachePolicy.noStore(res);
    res.json(comparison);
  });
  return router;
}
