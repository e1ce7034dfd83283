import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { expect } from 'chai';
import { ForeignKeyConstraintError, QueryTypes } from 'sequelize';
import { createApp, type CreatedApp } from '../../api/src/app';
import { loadConfig } from '../../api/src/config';
import { migrations } from '../../api/src/db/migrations';
import { seeders } from '../../api/src/db/seeders';

describe('api: database set-up', function () {
  this.timeout(60_000);
  let dir: string;
  let created: CreatedApp;

  before(async () => {
    dir = fs.mkdtempSync(path.join(os.tmpdir(), 'sylvasift-db-'));
    created = await createApp(loadConfig({ NODE_ENV: 'test', DATABASE_URL: `sqlite:${path.join(dir, 'test.sqlite')}` }));
  });
  after(async () => {
    await created?.close();
    fs.rmSync(dir, { recursive: true, force: true });
  });

  async function names(table: string): Promise<string[]> {
    const rows = await created.context.sequelize.query<{ name: string }>(`SELECT name FROM ${table} ORDER BY name`, { type: QueryTypes.SELECT });
    return rows.map((row) => row.name);
  }

  it('tracks migrations and seeders in separate tables', async () => {
    expect(await names('schema_migrations')).to.deep.equal(migrations.map((m) => m.name).sort());
    expect(await names('seed_runs')).to.deep.equal(seeders.map((s) => s.name).sort());
  });

  // SQLite documentation, "PRAGMA foreign_keys" and "Write-Ahead Logging": both are per-database settings we rely on.
  it('opens the file with WAL journaling and foreign keys enforced', async () => {
    const [journal] = await created.context.sequelize.query<{ journal_mode: string }>('PRAGMA journal_mode', { type: QueryTypes.SELECT });
    expect(journal?.journal_mode).to.equal('wal');
    const [keys] = await created.context.sequelize.query<{ foreign_keys: number }>('PRAGMA foreign_keys', { type: QueryTypes.SELECT });
    expect(keys?.foreign_keys).to.equal(1);
    // A cell that is valid in every way except that its taxon does not exist: only the foreign key can refuse it.
    let refusal: unknown;
    try {
      await created.context.models.Cell.create({ taxonId: 'no-such-taxon', traitCode: 'foliage', value: 'unknown' });
    } catch (error) {
      refusal = error;
    }
    expect(refusal, 'a cell pointing at a missing taxon must be rejected').to.be.instanceOf(ForeignKeyConstraintError);
    expect(String((refusal as ForeignKeyConstraintError).parent?.message), 'SQLite names the failed constraint').to.match(/FOREIGN KEY constraint failed/);
  });

  it('seeds the reference matrix once and publishes it as edition 1', async () => {
    const editions = await created.context.models.Edition.findAll();
    expect(editions.map((e) => e.number)).to.deep.equal([1]);
    const restarted = await createApp(loadConfig({ NODE_ENV: 'test', DATABASE_URL: `sqlite:${path.join(dir, 'test.sqlite')}` }));
    try {
      expect(await restarted.context.models.Edition.count()).to.equal(1);
      expect(await restarted.context.models.Taxon.count()).to.equal(await created.context.models.Taxon.count());
    } finally {
      await restarted.close();
    }
  });
});
