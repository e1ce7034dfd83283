import { Router } from 'express';
import { requireUser } from '../auth/guards';
import { actorOf } from '../matrix/actor';
import { cachePolicy } from '../http/caching';
import { openToAnonymousButKeysNeed } from '../auth/lookup-access';
import { editionService, type EditionDeps } from './edition-service';

/** Published editions, the current edition's engine bundle, and publishing a new edition. */
export function editionRoutes(deps: EditionDeps): Router {
  const router = Router();
  const editions = editionService(deps);
  const lookup = openToAnonymousButKeysNeed('lookup');

  router.get('/', lookup, async (_req, res) => {
    const result = await editions.list();
    cachePolicy.publicLookup(res);
    res.json(result);
  });

  router.get('/current/bundle', lookup, async (_req, res) => {
    const edition = await deps.editions.current();
    const { bytes, etag } = edition.bundle;
    cachePolicy.bundle(res);
    res.set({ ETag: etag, 'X-Sylvasift-Edition': String(edition.number), 'Last-Modified': edition.publishedAt.toUTCString() });
    res.vary('Authorization');
    res.type('application/octet-stream').send(bytes);
  });

  router.get('/:number', lookup, async (req, res) => {
    const result = await editions.get(Number(req.params['number']));
    cachePolicy.publicLookup(res);
    res.json(result);
  });

  router.post('/', requireUser('curator'), async (req, res) => {
    const body = req.body as { title: string; region?: string; reason: string };
    const edition = await editions.publish(actorOf(req.principal), body);
    cachePolicy.noStore(res);
    res.status(201).location(`/api/v1/editions/${edition.number}`).json(edition);
  });

  return router;
}
