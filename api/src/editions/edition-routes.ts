import { Router } from 'express';
import { requireUser } from '../auth/guards';
import { actorOf } from '../curation/actor';
import { cachePolicy, matchesIfNoneMatch } from '../http/caching';
import { openToAnonymousButKeysNeed } from '../http/lookup-access';
import { getEdition, listEditions } from './edition-reading';
import { publishWorkingMatrix, type PublishingDeps } from './edition-publishing';

/** Published editions, the current edition's engine bundle, and publishing a new edition. */
export function editionRoutes(deps: PublishingDeps): Router {
  const router = Router();
  const lookup = openToAnonymousButKeysNeed('lookup');

  router.get('/', lookup, async (_req, res) => {
    const result = await listEditions(deps.models);
    cachePolicy.publicLookup(res);
    res.json(result);
  });

  router.get('/current/bundle', lookup, async (req, res) => {
    const edition = await deps.editions.current();
    const { bytes, etag } = edition.bundle;
    cachePolicy.bundle(res);
    res.set({ ETag: etag, 'X-Sylvasift-Edition': String(edition.number), 'Last-Modified': edition.publishedAt.toUTCString() });
    res.vary('Authorization');
    if (matchesIfNoneMatch(req, etag)) {
      res.status(304).end();
      return;
    }
    res.type('application/octet-stream').send(bytes);
  });

  router.get('/:number', lookup, async (req, res) => {
    const result = await getEdition(deps.models, Number(req.params['number']));
    cachePolicy.publicLookup(res);
    res.json(result);
  });

  router.post('/', requireUser('curator'), async (req, res) => {
    const body = req.body as { title: string; region?: string; reason: string };
    const edition = await publishWorkingMatrix(deps, actorOf(req.principal), body);
    cachePolicy.noStore(res);
    res.status(201).location(`/api/v1/editions/${edition.number}`).json(edition);
  });

  return router;
}
