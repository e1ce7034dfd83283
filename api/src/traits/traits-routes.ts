import { Router } from 'express';
import type { EditionCatalog } from '../editions/edition-catalog';
import { cachePolicy } from '../http/caching';
import { traitsService } from './traits-service';

/** The trait vocabulary of the current edition. Public; partner keys need `lookup`. */
export function traitsRoutes(editions: EditionCatalog): Router {
  const traits = traitsService(editions);
  const router = Router();
  router.get('/', async (_req, res) => {
    const result = await traits.list();
    cachePolicy.publicLookup(res);
    res.json(result);
  });
  return router;
}
