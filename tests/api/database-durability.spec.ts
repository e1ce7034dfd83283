import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { expect } from 'chai';
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import { openDatabase } from '../../api/src/db/database';

describe('api: SQLite durability settings', () => {
  let dir: string;
  let sequelize: Sequelize | undefined;
  beforeEach(() => {
    dir = fs.mkdtempSync(path.join(os.tmpdir(), 'sylvasift-sync-'));
  });
  afterEach(async () => {
    await sequelize?.close();
    sequelize = undefined;
    fs.rmSync(dir, { recursive: true, force: true });
  });

  const synchronous = async (db: Sequelize, transaction?: Transaction) => {
    const [row] = await db.query<{ synchronous: number }>('PRAGMA synchronous', { type: QueryTypes.SELECT, ...(transaction ? { transaction } : {}) });
    return row?.synchronous;
  };

  it('a file database in WAL mode syncs at checkpoints only (NORMAL), on every connection', async () => {
    sequelize = await openDatabase(`sqlite:${path.join(dir, 'sync.sqlite')}`);
    const db = sequelize;
    const [journal] = await db.query<{ journal_mode: string }>('PRAGMA journal_mode', { type: QueryTypes.SELECT });
    expect(journal?.journal_mode).to.equal('wal');
    expect(await synchronous(db)).to.equal(1);
    // transactions run on a connection of their own
    await db.transaction(async (transaction) => {
      expect(await synchronous(db, transaction)).to.equal(1);
    });
  });

  it('leaves an in-memory database at the default', async () => {
    sequelize = await openDatabase('sqlite::memory:');
    expect(await synchronous(sequelize)).to.equal(2);
  });
});
