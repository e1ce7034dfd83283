import { Router } from 'express';
import { requireUser } from '../auth/guards';
import { actorOf } from '../matrix/actor';
import { cachePolicy, matchesIfNoneMatch } from '../http/caching';
import { codedTag, compressedVariant, preferredCoding } from '../http/compression';
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

  router.get('/current/bundle', lookup, async (req, res) => {
    const edition = await deps.editions.current();
    const { bytes, etag } = edition.bundle;
    cachePolicy.bundle(res);
    res.set({ 'X-Sylvasift-Edition': String(edition.number), 'Last-Modified': edition.publishedAt.toUTCString() });
    res.vary('Authorization');
    res.vary('Accept-Encoding');
    res.type('application/octet-stream');
    // One compressed copy per edition and coding, made once, each with a tag of its own.
    const coding = preferredCoding(req);
    res.set('ETag', coding === null ? etag : codedTag(etag, coding));
    // Compared here rather than by req.fresh, which gives up when the client also sends Cache-Control: no-cache.
    if (matchesIfNoneMatch(req, etag, codedTag(etag, 'br'), codedTag(etag, 'gzip'))) {
      res.status(304).end();
      return;
    }
    if (coding === null) {
      res.send(bytes);
      return;
    }
    const compressed = await compressedVariant(bytes, coding);
    res.set('Content-Encoding', coding).send(compressed);
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
