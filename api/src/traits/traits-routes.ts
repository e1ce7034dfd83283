import { Router } from 'express';
import type { EditionCatalog } from '../editions/edition-catalog';
import { cachePolicy } from '../http/caching';
import { listPublishedTraits } from './traits-service';

/** The trait vocabulary of the current edition. Public; partner keys need `lookup`. */
export function traitsRoutes(editions: EditionCatalog): Router {
  const router = Router();
  router.get('/', async (_req, res) => {
    const result = await listPublishedTraits(editions);
    cachePolicy.publicLookup(res);
    res.json(result);
  });
  return router;
}
