import type { Sequelize, Transaction } from 'sequelize';

/**
 * SQLite has one writer at a time, and an in-memory database runs every transaction on one shared
 * connection, where two overlapping BEGINs fail. Curation writes therefore queue per database: each
 * transaction starts when the previous one has finished. Correctness against lost updates still
 * rests on the conditional writes inside (`UPDATE … WHERE version = ?`), not on this queue.
 */
const queues = new WeakMap<Sequelize, Promise<unknown>>();

export function writeTransaction<T>(sequelize: Sequelize, work: (transaction: Transaction) => Promise<T>): Promise<T> {
  const previous = queues.get(sequelize) ?? Promise.resolve();
  const next = previous.catch(() => undefined).then(() => sequelize.transaction(work));
  queues.set(sequelize, next.catch(() => undefined));
  return next;
}
