import { Router } from 'express';
import { FIELD_LIMITS } from '@shared/engine';
import { currentUser, requireUser } from '../auth/guards';
import { problems } from '../http/problem';
import { idParam, stringField } from '../http/request-fields';
import type { CellChange } from '../curation/cell-service';
import type { QueryState } from './query-models';
import type { QueryService } from './query-service';
import type { CellQuery } from './query-store';

const STATES: readonly QueryState[] = ['open', 'answered', 'settled'];
const iso = (date: Date | null) => (date ? date.toISOString() : null);

const queryView = (query: CellQuery) => ({
  ...query,
  settledAt: iso(query.settledAt),
  createdAt: query.createdAt.toISOString(),
  updatedAt: query.updatedAt.toISOString(),
  history: query.history.map((event) => ({ ...event, at: event.at.toISOString() })),
});

function optionalQueryString(value: unknown, name: string): string | undefined {
  if (value === undefined) return undefined;
  if (typeof value !== 'string') throw problems.invalidInput(`${name} must be given once.`, [{ name: `query.${name}`, reason: 'not a single value' }]);
  return value;
}

/** Queries on doubtful cells and the Second look queue (mounted at /api/v1/queries). */
export function queryRoutes(queries: QueryService): Router {
  const router = Router();
  const reviewer = requireUser('reviewer');
  router.use(requireUser(), (_req, res, next) => {
    res.set('Cache-Control', 'no-store');
    next();
  });

  router.post('/', async (req, res) => {
    const query = await queries.raise(currentUser(req.principal), {
      taxonId: stringField(req.body, 'taxonId', { max: 120 }),
      traitCode: stringField(req.body, 'traitCode', { max: 64 }),
      note: stringField(req.body, 'note', { max: FIELD_LIMITS.queryText.max }),
    });
    res.status(201).location(`/api/v1/queries/${query.id}`).json(queryView(query));
  });

  router.get('/', async (req, res) => {
    const state = optionalQueryString(req.query['state'], 'state');
    if (state !== undefined && !(STATES as readonly string[]).includes(state)) {
      throw problems.invalidInput('state must be open, answered or settled.', [{ name: 'query.state', reason: 'unknown state' }]);
    }
    const list = await queries.list(currentUser(req.principal), {
      state: state as QueryState | undefined,
      taxonId: optionalQueryString(req.query['taxonId'], 'taxonId'),
      traitCode: optionalQueryString(req.query['traitCode'], 'traitCode'),
    });
    res.json({ queries: list.map(queryView) });
  });

  router.get('/:id', async (req, res) => {
    res.json(queryView(await queries.get(currentUser(req.principal), idParam(req.params['id']))));
  });

  router.get('/:id/cell', reviewer, async (req, res) => {
    res.json(await queries.cell(idParam(req.params['id'])));
  });

  router.post('/:id/answer', reviewer, async (req, res) => {
    const evidence = stringField(req.body, 'evidence', { optional: true, max: FIELD_LIMITS.queryText.max });
    const query = await queries.answer(currentUser(req.principal), idParam(req.params['id']), {
      answer: stringField(req.body, 'answer', { max: FIELD_LIMITS.queryText.max }),
      evidence: evidence === '' ? null : evidence,
    });
    res.json(queryView(query));
  });

  router.post('/:id/settle', reviewer, async (req, res) => {
    const note = stringField(req.body, 'note', { optional: true, max: FIELD_LIMITS.queryText.max });
    res.json(queryView(await queries.settle(currentUser(req.principal), idParam(req.params['id']), note === '' ? null : note)));
  });

  router.post('/:id/recode', reviewer, async (req, res) => {
    const body = req.body as CellChange;
    const { query, cell } = await queries.recode(currentUser(req.principal), idParam(req.params['id']), {
      value: body.value,
      version: body.version,
      reason: stringField(req.body, 'reason', { max: FIELD_LIMITS.changeReason.max }),
    });
    res.json({ query: queryView(query), cell });
  });

  return router;
}
