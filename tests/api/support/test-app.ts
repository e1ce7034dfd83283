import { expect } from 'chai';
import { createApp, type CreatedApp } from '../../../api/src/app';
import { loadConfig } from '../../../api/src/config';
import { testDatabaseUrl } from './test-database';

/**
 * A fresh in-process app on its own database (migrated and seeded with the reference matrix,
 * edition 1): in-memory SQLite, or with TEST_DATABASE=postgres a new PostgreSQL database. Every JSON response is checked against openapi.yaml; `assertContractKept`
 * fails the test that produced a response the contract does not describe.
 */
export async function startTestApp(env: Record<string, string> = {}): Promise<CreatedApp> {
  const databaseUrl = await testDatabaseUrl(env['DATABASE_URL']);
  return createApp(loadConfig({ NODE_ENV: 'test', ...env, ...(databaseUrl ? { DATABASE_URL: databaseUrl } : {}) }));
}

export function assertContractKept(created: CreatedApp): void {
  const violations = created.contractViolations.splice(0);
  expect(
    violations,
    `responses that break openapi.yaml:\n${violations.map((v) => `${v.method} ${v.path} ${v.status}: ${v.message}`).join('\n')}`,
  ).to.deep.equal([]);
}
