import fs from 'node:fs';
import path from 'node:path';
import { expect } from 'chai';
import type { BrowserContext, Page } from 'playwright-core';
import { demoAccount, seriousViolations } from './support/checks';
import { browserSuite } from './support/harness';
import { SCREENSHOT_DIR } from './support/server';
import { openPart, waitForSift } from './support/sift-page';
import { DEMO_PASSWORD } from '../../api/src/db/seeders/0002-demo-scenario';
import { DEMO_STUDY_SET } from '../../api/src/db/seeders/0003-demo-study-set';

/**
 * The app follows the device's light or dark setting (many phones in the field are set to dark).
 * Every screen is checked with axe in the dark scheme too: WCAG 2.1 AA contrast, 1.4.3, is the
 * check that differs between the two.
 */
describe('e2e: the dark colour scheme', function () {
  this.timeout(120_000);
  const running = browserSuite();
  let context: BrowserContext;

  async function darkPage(width: number): Promise<Page> {
    context = await running.newContext({ viewport: { width, height: 900 }, colorScheme: 'dark', serviceWorkers: 'block' });
    return context.newPage();
  }

  async function check(page: Page, name: string): Promise<void> {
    fs.mkdirSync(SCREENSHOT_DIR, { recursive: true });
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, `dark-${name}.png`), fullPage: true });
    expect(await seriousViolations(page), name).to.deep.equal([]);
  }

  it('is dark when the device asks for it', async () => {
    const page = await darkPage(1280);
    await page.goto(`${running.baseUrl}/`);
    await page.locator('h1').first().waitFor();
    const background = await page.evaluate(() => getComputedStyle(document.body).backgroundColor);
    const [r, g, b] = (background.match(/\d+/g) ?? []).map(Number);
    // a dark surface: luma (ITU-R BT.709 weights on the sRGB values) under a quarter of full scale (common practice, no source)
    expect(0.2126 * r + 0.7152 * g + 0.0722 * b, background).to.be.below(64);
    await check(page, 'home');
  });

  it('the sift and species pages keep AA contrast in the dark', async () => {
    const page = await darkPage(1280);
    await page.goto(`${running.baseUrl}/sift?o=needles-per-fascicle:3;needle-length:6in&season=leaf-on&leeway=2`);
    await waitForSift(page);
    await openPart(page, 'Bark');
    await page.locator('sv-trait-picker .help-toggle').first().click();
    await page.locator('sv-shortlist .why mat-expansion-panel-header').first().click();
    await page.locator('sv-shortlist .reasons li').first().waitFor();
    await check(page, 'sift');

    await page.goto(`${running.baseUrl}/species/toxicodendron-vernix`);
    await page.locator('h1', { hasText: /sumac/i }).waitFor();
    await check(page, 'species');
  });

  it('the account and study pages keep AA contrast in the dark', async () => {
    const page = await darkPage(390);
    await page.goto(`${running.baseUrl}/sign-in?next=%2Fstudy`);
    await page.getByLabel('E-mail').waitFor();
    await check(page, 'sign-in');
    await page.getByLabel('E-mail').fill(demoAccount('coach').email);
    await page.getByLabel('Password').fill(DEMO_PASSWORD);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL(/\/study$/);
    const card = page.locator('.set-card', { hasText: DEMO_STUDY_SET.name });
    await card.waitFor();
    await check(page, 'study-list');

    await card.getByRole('link', { name: 'Edit' }).click();
    await page.locator('.species-order .species-item').first().waitFor();
    await check(page, 'study-editor');

    const id = /\/study\/(\d+)\/edit$/.exec(page.url())?.[1];
    await page.goto(`${running.baseUrl}/study/${id}/drill?seed=3`);
    await page.locator('.question .choice').first().waitFor();
    await check(page, 'drill');
    await page.locator('.choice').first().click();
    await page.locator('[data-feedback]').waitFor();
    await check(page, 'drill-feedback');

    await page.goto(`${running.baseUrl}/study/${id}/sheet`);
    await page.locator('.sheet-card').first().waitFor();
    await check(page, 'study-sheet');

    await page.goto(`${running.baseUrl}/account`);
    await page.locator('h1').first().waitFor();
    await check(page, 'account');
  });
});
