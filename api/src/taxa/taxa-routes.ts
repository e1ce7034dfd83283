import { Router } from 'express';
import { cachePolicy } from '../http/caching';
import { taxaService, type LookupDeps } from './taxa-service';

/** Published species: search by name and the species page. Public; partner keys need `lookup`. */
export function taxaRoutes(deps: LookupDeps): Router {
  const taxa = taxaService(deps);
  const router = Router();

  router.get('/', async (req, res) => {
    const query = typeof req.query['q'] === 'string' ? req.query['q'] : '';
    const page = Number(req.query['page'] ?? 1);
    const pageSize = Number(req.query['pageSize'] ?? 20);
    const result = await taxa.find(query, page, pageSize);
    cachePolicy.publicLookup(res);
    res.json(result);
  });

  router.get('/:id', async (req, res) => {
    const detail = await taxa.describe(req.params['id'] as string);
    cachePolicy.publicLookup(res);
    res.json(detail);
  });

  return router;
}
