import type { Sequelize, Transaction } from 'sequelize';

/**
 * The few places where SQLite and PostgreSQL need different SQL or different operating advice.
 * Everything else goes through the same Sequelize models and migrations.
 */
export function isPostgres(sequelize: Sequelize): boolean {
  return sequelize.getDialect() === 'postgres';
}

/**
 * One key for every curation write transaction (an arbitrary 64-bit constant: "sylvasift" in ASCII).
 * PostgreSQL runs many writers at once; curation writes read the working matrix and then change it,
 * so like SQLite's single writer they take turns, across every process on the database.
 */
const CURATION_WRITE_LOCK = 0x73796c7661736966n;

/**
 * Makes the transaction the only curation writer until it ends (a transaction-level advisory lock,
 * released by COMMIT or ROLLBACK). SQLite needs nothing: it allows one writer at a time anyway.
 */
export async function takeCurationWriteLock(sequelize: Sequelize, transaction: Transaction): Promise<void> {
  if (!isPostgres(sequelize)) return;
  await sequelize.query('SELECT pg_advisory_xact_lock(:key)', { replacements: { key: CURATION_WRITE_LOCK.toString() }, transaction });
}

interface ConnectionSettings {
  host?: string;
  port?: string | number;
  database?: string;
  username?: string;
}

/** Quotes a word for a POSIX shell when it holds anything but plain characters. */
function shellWord(text: string): string {
  return /^[A-Za-z0-9_./:@%+=,-]+$/.test(text) ? text : `'${text.replace(/'/g, `'\\''`)}'`;
}

/**
 * The pg_dump and pg_restore commands for this database, without its password (pg_dump reads that
 * from PGPASSWORD or ~/.pgpass). Custom format: compressed, and pg_restore can pick parts of it.
 */
export function postgresBackupCommands(sequelize: Sequelize): { backup: string; restore: string } {
  const settings = ((sequelize as unknown as { config?: ConnectionSettings }).config ?? {}) as ConnectionSettings;
  const target = [
    `--host=${shellWord(settings.host ?? 'localhost')}`,
    `--port=${shellWord(String(settings.port ?? 5432))}`,
    ...(settings.username ? [`--username=${shellWord(settings.username)}`] : []),
    `--dbname=${shellWord(settings.database ?? 'sylvasift')}`,
  ].join(' ');
  const file = shellWord(`${settings.database ?? 'sylvasift'}.dump`);
  return {
    backup: `pg_dump --format=custom ${target} --file=${file}`,
    restore: `pg_restore --clean --if-exists --single-transaction ${target} ${file}`,
  };
}
