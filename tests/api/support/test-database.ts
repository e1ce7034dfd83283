import { createHash } from 'node:crypto';
import { Sequelize } from 'sequelize';
import { findPostgresBin, startPostgresServer, type PostgresServer } from '../../support/postgres-server';

/**
 * Which database the API suites run on: `TEST_DATABASE=sqlite` (the default, in-memory databases)
 * or `TEST_DATABASE=postgres` (a throwaway PostgreSQL server started once for the whole mocha run,
 * one fresh database per test app). Loaded by mocha as a root hook plugin (.mocharc `require`).
 */
export type TestDialect = 'sqlite' | 'postgres';

export function testDialect(): TestDialect {
  const value = (process.env['TEST_DATABASE'] ?? 'sqlite').toLowerCase();
  if (value === 'sqlite') return 'sqlite';
  if (value === 'postgres' || value === 'postgresql') return 'postgres';
  throw new Error(`TEST_DATABASE must be sqlite or postgres (got "${value}")`);
}

let server: PostgresServer | undefined;
let admin: Sequelize | undefined;
let created = 0;
/** `sqlite:<file>` URLs a test reuses (to restart on the same database) map to the same PostgreSQL database. */
const byFile = new Map<string, string>();

async function createDatabase(name: string): Promise<string> {
  if (!server || !admin) throw new Error('the PostgreSQL test server is not running (is tests/api/support/test-database.ts loaded as a mocha root hook?)');
  await admin.query(`CREATE DATABASE "${name}"`);
  return server.url(name);
}

/**
 * The DATABASE_URL a test app gets. On SQLite, what the test asked for (in-memory by default). On
 * PostgreSQL, `sqlite::memory:` (or nothing) becomes a new empty database, and a `sqlite:<file>`
 * becomes the database kept for that file, so a test that reopens its file reopens the same data.
 */
export async function testDatabaseUrl(requested: string | undefined): Promise<string | undefined> {
  if (testDialect() === 'sqlite') return requested;
  if (requested && !requested.startsWith('sqlite:')) return requested;
  const file = requested?.slice('sqlite:'.length) ?? ':memory:';
  if (file !== ':memory:' && file !== '') {
    const known = byFile.get(file);
    if (known) return known;
    const url = await createDatabase(`sylvasift_file_${createHash('sha256').update(file).digest('hex').slice(0, 12)}`);
    byFile.set(file, url);
    return url;
  }
  created += 1;
  return createDatabase(`sylvasift_test_${created}`);
}

/** Mocha root hooks: start the server before the first suite, stop it after the last. */
export const mochaHooks = {
  async beforeAll(this: Mocha.Context) {
    if (testDialect() !== 'postgres') return;
    this.timeout(120_000);
    if (!findPostgresBin()) {
      const message = 'TEST_DATABASE=postgres, but PostgreSQL (initdb, pg_ctl) is not installed: install the "postgresql" package.';
      if (process.env['CI']) throw new Error(message);
      console.warn(`\n${'!'.repeat(100)}\n!! ${message}\n!! SKIPPING every suite of this PostgreSQL run.\n${'!'.repeat(100)}\n`);
      this.skip();
    }
    server = await startPostgresServer();
    // should mocha be stopped half-way, the server goes with it (stop() is synchronous)
    process.once('exit', () => server?.stop());
    admin = new Sequelize(server.url('postgres'), { dialect: 'postgres', logging: false, pool: { max: 1 } });
    await admin.authenticate();
    console.log(`  (API suites on ${server.version}, port ${server.port})`);
  },
  async afterAll(this: Mocha.Context) {
    this.timeout(60_000);
    await admin?.close();
    admin = undefined;
    server?.stop();
    server = undefined;
  },
};
