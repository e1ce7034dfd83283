import { Router } from 'express';
import { requireUser } from '../auth/guards';
import type { EditionCatalog } from '../editions/edition-catalog';
import { cachePolicy } from '../http/caching';
import { actorOf } from '../matrix/actor';
import { listAudit, type AuditEntity } from '../matrix/audit-store';
import { cellService, type CellChange, type CurationDeps } from './cell-service';
import { draftService } from './draft-service';
import { entityService, type EntityService } from './entity-service';
import { curatedTaxonView, curatedTraitView, curatedValueView } from './curation-views';

type Body = Record<string, unknown> & { reason: string };

function withoutReason(body: Body): Record<string, unknown> {
  const { reason: _reason, ...fields } = body;
  return fields;
}

/** The Matrix desk: curators edit the working matrix; every change lands in the audit log. */
export function curationRoutes(deps: CurationDeps & { editions: EditionCatalog }): Router {
  const cells = cellService(deps);
  const entities = entityService(deps);
  const draft = draftService(deps);
  const router = Router();
  router.use(requireUser('curator'));

  router.get('/cells/:taxonId/:traitCode', async (req, res) => {
    const cell = await cells.get(req.params['taxonId'] as string, req.params['traitCode'] as string);
    cachePolicy.privateRevalidate(res);
    res.json(cell);
  });

  router.put('/cells/:taxonId/:traitCode', async (req, res) => {
    const cell = await cells.set(actorOf(req.principal), req.params['taxonId'] as string, req.params['traitCode'] as string, req.body as CellChange);
    cachePolicy.noStore(res);
    res.json(cell);
  });

  router.post('/taxa', async (req, res) => {
    const body = req.body as Body & { id: string };
    const { id: _id, ...fields } = withoutReason(body);
    const taxon = await entities.createTaxon(actorOf(req.principal), body.id, fields as Parameters<EntityService['createTaxon']>[2], body.reason);
    res.status(201).location(`/api/v1/curation/taxa/${body.id}`).json(curatedTaxonView(taxon));
  });

  router.patch('/taxa/:id', async (req, res) => {
    const body = req.body as Body;
    res.json(curatedTaxonView(await entities.updateTaxon(actorOf(req.principal), req.params['id'] as string, withoutReason(body), body.reason)));
  });

  router.post('/traits', async (req, res) => {
    const body = req.body as Body & { code: string; values?: Parameters<EntityService['createTrait']>[3] };
    const { code: _code, values: _values, ...fields } = withoutReason(body);
    const trait = await entities.createTrait(
      actorOf(req.principal),
      body.code,
      fields as Parameters<EntityService['createTrait']>[2],
      body.values ?? [],
      body.reason,
    );
    res.status(201).json(curatedTraitView(trait, trait.values));
  });

  router.patch('/traits/:code', async (req, res) => {
    const body = req.body as Body;
    res.json(curatedTraitView(await entities.updateTrait(actorOf(req.principal), req.params['code'] as string, withoutReason(body), body.reason)));
  });

  router.post('/traits/:code/values', async (req, res) => {
    const body = req.body as Body & { code: string };
    const { code: _code, ...fields } = withoutReason(body);
    const value = await entities.createValue(
      actorOf(req.principal),
      req.params['code'] as string,
      body.code,
      fields as Parameters<EntityService['createValue']>[3],
      body.reason,
    );
    res.status(201).json(curatedValueView(req.params['code'] as string, value));
  });

  router.patch('/traits/:code/values/:value', async (req, res) => {
    const body = req.body as Body;
    res.json(
      curatedValueView(
        req.params['code'] as string,
        await entities.updateValue(actorOf(req.principal), req.params['code'] as string, req.params['value'] as string, withoutReason(body), body.reason),
      ),
    );
  });

  router.get('/audit', async (req, res) => {
    const query = req.query as Record<string, string | undefined>;
    const entries = await listAudit(deps.models, {
      entity: query['entity'] as AuditEntity | undefined,
      entityKey: query['key'],
      userId: query['user'] === undefined ? undefined : Number(query['user']),
      since: query['since'] === undefined ? undefined : new Date(query['since']),
      before: query['before'] === undefined ? undefined : Number(query['before']),
      limit: Number(query['limit'] ?? 50),
    });
    cachePolicy.privateRevalidate(res);
    res.json({ entries, next: entries.length > 0 && entries.length === Number(query['limit'] ?? 50) ? entries[entries.length - 1]!.id : null });
  });

  router.get('/matrix', async (req, res) => {
    const matrix = await draft.workingMatrix(req.query['format'] === 'packed' ? 'packed' : 'full');
    cachePolicy.privateRevalidate(res);
    res.json(matrix);
  });

  router.get('/draft/summary', async (_req, res) => {
    const summary = await draft.summarise();
    cachePolicy.privateRevalidate(res);
    res.json(summary);
  });

  return router;
}
