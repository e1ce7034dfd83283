import fs from 'node:fs/promises';
import path from 'node:path';
import { randomBytes } from 'node:crypto';
import type { Sequelize } from 'sequelize';
import { HttpProblem, problems } from '../http/problem';
import { migrations } from '../db/migrations';
import { isPostgres, postgresBackupCommands } from '../sql/dialect';

export interface Backup {
  name: string;
  bytes: number;
  createdAt: Date;
}

/** Only names this service makes are accepted, which also keeps every path inside the backup folder. */
const BACKUP_NAME = /^sylvasift-\d{8}T\d{9}Z-[a-f0-9]{6}\.sqlite$/;
const SQLITE_HEADER = Buffer.from('SQLite format 3\0', 'latin1');

interface RawSqlite {
  exec(sql: string, callback: (error: Error | null) => void): void;
  all(sql: string, params: unknown[], callback: (error: Error | null, rows: Array<Record<string, unknown>>) => void): void;
}
interface ConnectionManager {
  getConnection(options: { uuid: string; type: 'write' }): Promise<RawSqlite>;
  releaseConnection(connection: RawSqlite): Promise<void> | void;
}

/** Backups here copy SQLite files; on PostgreSQL the answer names the server's own tools for this database. */
function notSqlite(sequelize: Sequelize): HttpProblem {
  if (!isPostgres(sequelize)) {
    return new HttpProblem(
      501,
      'not-implemented',
      'Not implemented',
      'Backups and restores here work on SQLite only; back up other databases with their own tools.',
    );
  }
  const commands = postgresBackupCommands(sequelize);
  return new HttpProblem(
    501,
    'not-implemented',
    'Not implemented',
    'Backups and restores here work on SQLite only, and this Sylvasift runs on PostgreSQL: nothing was backed up or restored. ' +
      `Back it up with \`${commands.backup}\`; restore, with the API stopped, with \`${commands.restore}\` ` +
      '(both read the password from PGPASSWORD or ~/.pgpass).',
  );
}
const notOurs = (detail: string) => new HttpProblem(422, 'not-a-sylvasift-backup', 'Not a Sylvasift backup', detail);

const exec = (db: RawSqlite, sql: string) => new Promise<void>((resolve, reject) => db.exec(sql, (error) => (error ? reject(error) : resolve())));
const all = (db: RawSqlite, sql: string, params: unknown[] = []) =>
  new Promise<Array<Record<string, unknown>>>((resolve, reject) => db.all(sql, params, (error, rows) => (error ? reject(error) : resolve(rows))));
const quoteIdentifier = (name: string) => `"${name.replace(/"/g, '""')}"`;
const quoteLiteral = (text: string) => `'${text.replace(/'/g, "''")}'`;

function stamp(date: Date): string {
  return date.toISOString().replace(/[-:.]/g, '');
}

export function backupService(sequelize: Sequelize, backupDir: string, afterRestore: () => void) {
  function requireSqlite(): void {
    if (sequelize.getDialect() !== 'sqlite') throw notSqlite(sequelize);
  }

  function fileOf(name: string): string {
    if (!BACKUP_NAME.test(name)) throw problems.invalidInput('That is not the name of a backup.', [{ name: 'path.name', reason: 'not a backup name' }]);
    return path.join(backupDir, name);
  }

  /** Runs `work` on one raw connection of its own (the shared one for an in-memory database). */
  async function onOwnConnection<T>(work: (db: RawSqlite) => Promise<T>): Promise<T> {
    const manager = sequelize.connectionManager as unknown as ConnectionManager;
    const db = await manager.getConnection({ uuid: `restore-${randomBytes(4).toString('hex')}`, type: 'write' });
    try {
      return await work(db);
    } finally {
      await manager.releaseConnection(db);
    }
  }

  async function tablesOf(db: RawSqlite, schema: 'main' | 'snapshot'): Promise<Map<string, string[]>> {
    const tables = await all(db, `SELECT name FROM ${schema}.sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name`);
    const result = new Map<string, string[]>();
    for (const { name } of tables) {
      const columns = await all(db, `PRAGMA ${schema}.table_info(${quoteIdentifier(String(name))})`);
      result.set(
        String(name),
        columns.map((c) => String(c['name'])),
      );
    }
    return result;
  }

  /** The snapshot must hold exactly our tables and columns, at exactly the migrations this code has. */
  async function checkSnapshot(db: RawSqlite): Promise<Map<string, string[]>> {
    const ours = await tablesOf(db, 'main');
    const theirs = await tablesOf(db, 'snapshot');
    for (const [table, columns] of ours) {
      const other = theirs.get(table);
      if (!other) throw notOurs(`The file has no table ${table}.`);
      if (other.join(',') !== columns.join(',')) throw notOurs(`The table ${table} in the file has other columns than this version expects.`);
    }
    const names = async (schema: 'main' | 'snapshot') =>
      (await all(db, `SELECT name FROM ${schema}.schema_migrations ORDER BY name`)).map((r) => String(r['name']));
    const [applied, live] = await Promise.all([names('snapshot'), names('main')]);
    const expected = migrations.map((m) => m.name);
    if (applied.join(',') !== live.join(',') || !expected.every((name) => applied.includes(name))) {
      throw notOurs('The file was made at another schema version than this code runs.');
    }
    return ours;
  }

  return {
    /** A consistent snapshot of the live database (VACUUM INTO), written next to the others. */
    async create(): Promise<Backup> {
      requireSqlite();
      await fs.mkdir(backupDir, { recursive: true });
      const now = new Date();
      const name = `sylvasift-${stamp(now)}-${randomBytes(3).toString('hex')}.sqlite`;
      const file = path.join(backupDir, name);
      await sequelize.query(`VACUUM INTO ${quoteLiteral(file)}`);
      const stat = await fs.stat(file);
      return { name, bytes: stat.size, createdAt: now };
    },

    async list(): Promise<Backup[]> {
      requireSqlite();
      const names = await fs.readdir(backupDir).catch(() => [] as string[]);
      const backups = await Promise.all(
        names
          .filter((name) => BACKUP_NAME.test(name))
          .map(async (name) => {
            const stat = await fs.stat(path.join(backupDir, name));
            return { name, bytes: stat.size, createdAt: stat.mtime };
          }),
      );
      return backups.sort((a, b) => b.name.localeCompare(a.name));
    },

    /** The file of one backup, for downloading it. */
    async fileFor(name: string): Promise<string> {
      requireSqlite();
      const file = fileOf(name);
      const found = await fs.stat(file).catch(() => undefined);
      if (!found?.isFile()) throw problems.notFound(`There is no backup ${name}.`);
      return file;
    },

    /**
     * Replaces every row of every table with the snapshot's, in one transaction (foreign keys
     * checked at commit). The file must be a SQLite database with this version's schema.
     */
    async restore(name: string): Promise<void> {
      requireSqlite();
      const file = fileOf(name);
      const handle = await fs.open(file, 'r').catch(() => undefined);
      if (!handle) throw problems.notFound(`There is no backup ${name}.`);
      const header = Buffer.alloc(SQLITE_HEADER.length);
      try {
        await handle.read(header, 0, header.length, 0);
      } finally {
        await handle.close();
      }
      if (!header.equals(SQLITE_HEADER)) throw notOurs(`${name} is not a SQLite database.`);

      await onOwnConnection(async (db) => {
        await exec(db, `ATTACH DATABASE ${quoteLiteral(file)} AS snapshot`);
        try {
          const tables = await checkSnapshot(db);
          await exec(db, 'BEGIN IMMEDIATE');
          try {
            await exec(db, 'PRAGMA defer_foreign_keys = ON');
            for (const table of tables.keys()) await exec(db, `DELETE FROM main.${quoteIdentifier(table)}`);
            for (const [table, columns] of tables) {
              const list = columns.map(quoteIdentifier).join(', ');
              await exec(db, `INSERT INTO main.${quoteIdentifier(table)} (${list}) SELECT ${list} FROM snapshot.${quoteIdentifier(table)}`);
            }
            await exec(db, 'COMMIT');
          } catch (error) {
            await exec(db, 'ROLLBACK').catch(() => undefined);
            throw error;
          }
        } finally {
          await exec(db, 'DETACH DATABASE snapshot');
        }
      });
      afterRestore();
    },
  };
}

export type BackupService = ReturnType<typeof backupService>;
