/** Checks and lookups several browser suites share. */
import { AxeBuilder } from '@axe-core/playwright';
import { expect } from 'chai';
import type { Page } from 'playwright-core';
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../../../api/src/db/seeders/0002-demo-scenario';

/**
 * Waits until no finite animation or transition is running: an error fading in or a dialog opening
 * measures as a half-transparent colour part-way through. Endless ones (a progress spinner) never end
 * and are not waited for.
 */
export async function waitForAnimationsToEnd(page: Page, timeout = 5_000): Promise<void> {
  await page.waitForFunction(
    () => document.getAnimations().every((animation) => animation.playState !== 'running' || animation.effect?.getTiming().iterations === Infinity),
    undefined,
    { timeout },
  );
}

/** Serious and critical WCAG 2.1 A/AA violations axe finds on the page once it is still, one line each. */
export async function seriousViolations(page: Page): Promise<string[]> {
  await waitForAnimationsToEnd(page);
  const results = await new AxeBuilder({ page }).withTags(['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa']).analyze();
  return results.violations
    .filter((violation) => violation.impact === 'serious' || violation.impact === 'critical')
    .map(
      (violation) =>
        `${violation.id} (${violation.impact}): ${violation.nodes
          .map((node) => node.target.join(' '))
          .slice(0, 5)
          .join(', ')}`,
    );
}

/** The demo scenario's account with this role. */
export function demoAccount(role: string): (typeof DEMO_ACCOUNTS)[number] {
  const account = DEMO_ACCOUNTS.find((candidate) => candidate.role === role);
  if (!account) throw new Error(`no demo ${role}`);
  return account;
}

/** Nothing may overflow sideways at phone width (common practice, no source). */
export async function expectNoSidewaysOverflow(page: Page, what: string): Promise<void> {
  const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
  expect(overflow, `${what} overflows by ${overflow}px`).to.be.at.most(0);
}

/** Signs a demo account in through the sign-in page and lands on `next`, as someone following a link does. */
export async function signInThroughPage(page: Page, baseUrl: string, role: string, next: string): Promise<void> {
  const account = demoAccount(role);
  await page.goto(`${baseUrl}/sign-in?next=${encodeURIComponent(next)}`);
  await page.getByLabel('E-mail').fill(account.email);
  await page.getByLabel('Password').fill(DEMO_PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((url) => url.pathname + url.search === next);
}
