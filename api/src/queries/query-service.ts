import type { Logger } from 'pino';
import type { Sequelize, Transaction } from 'sequelize';
import type { MatrixModels } from '../matrix/matrix-models';
import type { AccountModels } from '../accounts/account-models';
import type { QueryModels } from './query-models';
import type { EditionModels } from '../editions/edition-models';
import type { Mailer } from '../mail/mailer';
import type { Principal } from '../auth/principal';
import { problems } from '../http/problem';
import { findAccount, listActiveEmailsWithRoles } from '../accounts/account-store';
import { cellService, type CellChange } from '../curation/cell-service';
import { readCell, type CellState } from '../curation/working-matrix-store';
import type { QueryAction, QueryState } from './query-models';
import { cellExists, insertEvent, insertQuery, moveQuery, readQueries, type CellQuery, type QueryFilter } from './query-store';

type User = Extract<Principal, { kind: 'user' }>;

export interface QueryDeps {
  sequelize: Sequelize;
  models: MatrixModels & EditionModels & AccountModels & QueryModels;
  mailer: Mailer;
  logger: Logger;
  publicUrl: string;
}

const mayReview = (user: User) => user.role === 'reviewer' || user.role === 'admin';

const notYours = (id: number) => problems.notFound(`There is no query ${id} you can see.`);

export function queryService(deps: QueryDeps) {
  const { sequelize, models, mailer } = deps;
  const cells = cellService({ sequelize, models });

  async function one(id: number, transaction?: Transaction): Promise<CellQuery> {
    const [query] = await readQueries(models, { id }, transaction);
    if (!query) throw problems.notFound(`There is no query ${id}.`);
    return query;
  }

  /** Tells the raiser and every reviewer (except whoever made the change) what happened to the query. */
  async function tellPeople(query: CellQuery, action: QueryAction, actor: User): Promise<void> {
    const raiser = await findAccount(models, query.raisedBy);
    const reviewers = await listActiveEmailsWithRoles(models, ['reviewer']);
    const to = [...new Set([...(raiser?.active ? [raiser.email] : []), ...reviewers])].filter((email) => email !== actor.email);
    if (to.length === 0) return;
    const cell = `${query.taxonId} × ${query.traitCode}`;
    const lines = [`${actor.displayName} ${action} query ${query.id} on the cell ${cell}. It is now ${query.state}.`, '', `Query: ${query.note}`];
    if (query.answer) lines.push(`Answer: ${query.answer}`);
    if (query.evidence) lines.push(`Evidence: ${query.evidence}`);
    if (query.outcome) lines.push(`Outcome: ${query.outcome === 'recoded' ? 'the cell was recoded' : 'the cell was kept as it is'}`);
    lines.push('', `Second look: ${deps.publicUrl}/review/queries/${query.id}`);
    await mailer.send({ to, subject: `Query ${query.id} on ${cell} ${action}`, text: lines.join('\n') });
  }

  /** Moves a query in a transaction, records who did it, then mails the people following it. */
  async function move(
    actor: User,
    id: number,
    action: QueryAction,
    from: QueryState[],
    note: string | null,
    write: (transaction: Transaction) => Promise<void>,
  ): Promise<CellQuery> {
    const query = await sequelize.transaction(async (transaction) => {
      // PostgreSQL: hold the query's row until commit, so two moves of one query cannot both pass the check (SQLite ignores row locks; it has one writer).
      await models.Query.findByPk(id, { attributes: ['id'], lock: transaction.LOCK.UPDATE, transaction });
      const before = await one(id, transaction);
      if (!from.includes(before.state)) {
        throw problems.conflict(`Query ${id} is ${before.state}; it can be ${action} only when ${from.join(' or ')}.`, { state: before.state });
      }
      await write(transaction);
      await insertEvent(models, { queryId: id, actorId: actor.userId, action, note }, transaction);
      return one(id, transaction);
    });
    await tellPeople(query, action, actor);
    return query;
  }

  return {
    /** Anyone signed in may flag a cell as doubtful; reviewers hear of it at once. */
    async raise(actor: User, input: { taxonId: string; traitCode: string; note: string }): Promise<CellQuery> {
      const exists = await cellExists(models, input.taxonId, input.traitCode);
      const invalid = [
        ...(exists.taxon ? [] : [{ name: '/taxonId', reason: 'no such taxon in the working matrix' }]),
        ...(exists.trait ? [] : [{ name: '/traitCode', reason: 'no such trait in the working matrix' }]),
      ];
      if (invalid.length > 0) throw problems.invalidInput('The query names a cell that does not exist.', invalid);
      const query = await sequelize.transaction(async (transaction) => {
        const id = await insertQuery(models, { ...input, raisedBy: actor.userId }, transaction);
        await insertEvent(models, { queryId: id, actorId: actor.userId, action: 'raised', note: input.note }, transaction);
        return one(id, transaction);
      });
      await tellPeople(query, 'raised', actor);
      return query;
    },

    /** Reviewers see every query; everyone else only the ones they raised. */
    list(actor: User, filter: QueryFilter): Promise<CellQuery[]> {
      return readQueries(models, mayReview(actor) ? filter : { ...filter, raisedBy: actor.userId });
    },

    async get(actor: User, id: number): Promise<CellQuery> {
      const query = await one(id).catch(() => undefined);
      if (!query || (!mayReview(actor) && query.raisedBy !== actor.userId)) throw notYours(id);
      return query;
    },

    /** The queried cell as the working matrix holds it now, with the version a recode must name. */
    async cell(id: number): Promise<CellState> {
      const query = await one(id);
      return readCell(models, query.taxonId, query.traitCode);
    },

    /** A reviewer answers with evidence; an answered query may be answered again until it is settled. */
    answer(actor: User, id: number, input: { answer: string; evidence: string | null }): Promise<CellQuery> {
      return move(actor, id, 'answered', ['open', 'answered'], input.answer, async (transaction) => {
        const moved = await moveQuery(
          models,
          id,
          ['open', 'answered'],
          { state: 'answered', answer: input.answer, evidence: input.evidence, answeredBy: actor.userId },
          transaction,
        );
        if (!moved) throw problems.conflict(`Query ${id} changed while you answered it.`);
      });
    },

    /** Settles an answered query, keeping the cell as it is. */
    settle(actor: User, id: number, note: string | null): Promise<CellQuery> {
      return move(actor, id, 'settled', ['answered'], note, async (transaction) => {
        const moved = await moveQuery(
          models,
          id,
          ['answered'],
          { state: 'settled', outcome: 'kept', settledBy: actor.userId, settledAt: new Date() },
          transaction,
        );
        if (!moved) throw problems.conflict(`Query ${id} changed while you settled it.`);
      });
    },

    /**
     * Recodes the cell through the Matrix desk's optimistic-locking write (a stale version is a 409 and
     * nothing changes), then settles the query as recoded.
     */
    async recode(actor: User, id: number, change: CellChange): Promise<{ query: CellQuery; cell: CellState }> {
      const before = await one(id);
      if (before.state === 'settled') throw problems.conflict(`Query ${id} is settled already.`, { state: before.state });
      const cell = await cells.set({ userId: actor.userId, email: actor.email }, before.taxonId, before.traitCode, {
        ...change,
        reason: `Query ${id}: ${change.reason}`,
      });
      const query = await move(actor, id, 'recoded', ['open', 'answered'], change.reason, async (transaction) => {
        const moved = await moveQuery(
          models,
          id,
          ['open', 'answered'],
          { state: 'settled', outcome: 'recoded', settledBy: actor.userId, settledAt: new Date() },
          transaction,
        );
        if (!moved) throw problems.conflict(`Query ${id} changed while you recoded it.`);
      });
      return { query, cell };
    },
  };
}

export type QueryService = ReturnType<typeof queryService>;
