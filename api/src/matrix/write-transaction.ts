import type { Sequelize, Transaction } from 'sequelize';
import { takeCurationWriteLock } from '../sql/dialect';

/**
 * SQLite has one writer at a time, and an in-memory database runs every transaction on one shared
 * connection, where two overlapping BEGINs fail. Curation writes therefore queue per database: each
 * transaction starts when the previous one has finished. Correctness against lost updates still
 * rests on the conditional writes inside (`UPDATE … WHERE version = ?`), not on this queue.
 * On PostgreSQL each such transaction also takes one advisory lock first, so curation writers take
 * turns across processes too (a publish then reads a working matrix no one is changing).
 */
const queues = new WeakMap<Sequelize, Promise<unknown>>();

export function writeTransaction<T>(sequelize: Sequelize, work: (transaction: Transaction) => Promise<T>): Promise<T> {
  const previous = queues.get(sequelize) ?? Promise.resolve();
  const next = previous
    .catch(() => undefined)
    .then(() =>
      sequelize.transaction(async (transaction) => {
        await takeCurationWriteLock(sequelize, transaction);
        return work(transaction);
      }),
    );
  queues.set(
    sequelize,
    next.catch(() => undefined),
  );
  return next;
}
