/** Checks and lookups several browser suites share. */
import { AxeBuilder } from '@axe-core/playwright';
import type { Page } from 'playwright-core';
import { DEMO_ACCOUNTS } from '../../../api/src/db/seeders/0002-demo-scenario';

/** Serious and critical WCAG 2.1 A/AA violations axe finds on the page, one line each. */
export async function seriousViolations(page: Page): Promise<string[]> {
  const results = await new AxeBuilder({ page }).withTags(['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa']).analyze();
  return results.violations
    .filter((violation) => violation.impact === 'serious' || violation.impact === 'critical')
    .map((violation) => `${violation.id} (${violation.impact}): ${violation.nodes.map((node) => node.target.join(' ')).slice(0, 5).join(', ')}`);
}

/** The demo scenario's account with this role. */
export function demoAccount(role: string): (typeof DEMO_ACCOUNTS)[number] {
  const account = DEMO_ACCOUNTS.find((candidate) => candidate.role === role);
  if (!account) throw new Error(`no demo ${role}`);
  return account;
}
