import { Op, type Transaction } from 'sequelize';
import type { MatrixModels } from '../matrix/matrix-models';
import type { AccountModels } from '../accounts/account-models';
import type { QueryModels } from './query-models';
import type { QueryAction, QueryOutcome, QueryState } from './query-models';

export interface QueryEvent {
  action: QueryAction;
  actorId: number;
  actorName: string;
  note: string | null;
  at: Date;
}

export interface CellQuery {
  id: number;
  taxonId: string;
  traitCode: string;
  note: string;
  state: QueryState;
  raisedBy: number;
  answer: string | null;
  evidence: string | null;
  answeredBy: number | null;
  outcome: QueryOutcome | null;
  settledBy: number | null;
  settledAt: Date | null;
  createdAt: Date;
  updatedAt: Date;
  history: QueryEvent[];
}

export interface QueryFilter {
  state?: QueryState;
  taxonId?: string;
  traitCode?: string;
  raisedBy?: number;
}

export async function insertQuery(
  models: MatrixModels & AccountModels & QueryModels,
  query: { taxonId: string; traitCode: string; note: string; raisedBy: number },
  transaction: Transaction,
): Promise<number> {
  const row = await models.Query.create(
    { ...query, state: 'open', answer: null, evidence: null, answeredBy: null, outcome: null, settledBy: null, settledAt: null },
    { transaction },
  );
  return row.id;
}

export async function insertEvent(
  models: MatrixModels & AccountModels & QueryModels,
  event: { queryId: number; actorId: number; action: QueryAction; note: string | null },
  transaction: Transaction,
): Promise<void> {
  await models.QueryEvent.create(event, { transaction });
}

/** Moves a query only if it is still in one of `from`; false when someone else moved it first. */
export async function moveQuery(
  models: MatrixModels & AccountModels & QueryModels,
  id: number,
  from: QueryState[],
  changes: Partial<{
    state: QueryState;
    answer: string;
    evidence: string | null;
    answeredBy: number;
    outcome: QueryOutcome;
    settledBy: number;
    settledAt: Date;
  }>,
  transaction: Transaction,
): Promise<boolean> {
  const [changed] = await models.Query.update(changes, { where: { id, state: { [Op.in]: from } }, transaction });
  return changed === 1;
}

export async function readQueries(
  models: MatrixModels & AccountModels & QueryModels,
  filter: QueryFilter & { id?: number },
  transaction?: Transaction,
): Promise<CellQuery[]> {
  const where: Record<string, unknown> = {};
  for (const [key, value] of Object.entries(filter)) if (value !== undefined) where[key] = value;
  const rows = await models.Query.findAll({
    where,
    order: [
      ['createdAt', 'ASC'],
      ['id', 'ASC'],
    ],
    transaction,
  });
  if (rows.length === 0) return [];
  const events = await models.QueryEvent.findAll({ where: { queryId: { [Op.in]: rows.map((r) => r.id) } }, order: [['id', 'ASC']], transaction });
  const actorIds = [...new Set(events.map((e) => e.actorId))];
  const actors = await models.User.findAll({ where: { id: { [Op.in]: actorIds } }, attributes: ['id', 'displayName'], transaction });
  const names = new Map(actors.map((a) => [a.id, a.displayName]));
  return rows.map((row) => ({
    id: row.id,
    taxonId: row.taxonId,
    traitCode: row.traitCode,
    note: row.note,
    state: row.state,
    raisedBy: row.raisedBy,
    answer: row.answer,
    evidence: row.evidence,
    answeredBy: row.answeredBy,
    outcome: row.outcome,
    settledBy: row.settledBy,
    settledAt: row.settledAt,
    createdAt: row.createdAt,
    updatedAt: row.updatedAt,
    history: events
      .filter((e) => e.queryId === row.id)
      .map((e) => ({ action: e.action, actorId: e.actorId, actorName: names.get(e.actorId) ?? 'someone', note: e.note, at: e.createdAt })),
  }));
}

export async function cellExists(
  models: MatrixModels & AccountModels & QueryModels,
  taxonId: string,
  traitCode: string,
): Promise<{ taxon: boolean; trait: boolean }> {
  const [taxon, trait] = await Promise.all([models.Taxon.findByPk(taxonId), models.Trait.findByPk(traitCode)]);
  return { taxon: Boolean(taxon && !taxon.retired), trait: Boolean(trait && !trait.retired) };
}
