import fs from 'node:fs';
import path from 'node:path';
import { expect } from 'chai';
import type { APIRequestContext, BrowserContext, Page } from 'playwright-core';
import { demoAccount, expectNoSidewaysOverflow, seriousViolations, signInThroughPage as signIn } from './support/checks';
import { browserSuite } from './support/harness';
import { SCREENSHOT_DIR } from './support/server';
import { DEMO_PASSWORD } from '../../api/src/db/seeders/0002-demo-scenario';

const DESKTOP = { width: 1280, height: 900 };
const PHONE = { width: 360, height: 780 };

async function shoot(page: Page, name: string, fullPage = false): Promise<void> {
  fs.mkdirSync(SCREENSHOT_DIR, { recursive: true });
  await page.screenshot({ path: path.join(SCREENSHOT_DIR, `${name}.png`), fullPage });
}

async function tokenFor(request: APIRequestContext, baseUrl: string, role: string): Promise<string> {
  const session = await request.post(`${baseUrl}/api/v1/sessions`, { data: { email: demoAccount(role).email, password: DEMO_PASSWORD } });
  expect(session.status()).to.equal(201);
  return ((await session.json()) as { token: string }).token;
}

/** Narrows the grid to one species and one trait, so the cell is on screen whatever the window. */
async function showOnly(page: Page, species: string, trait: string): Promise<void> {
  await page.getByRole('grid', { name: /Working matrix/ }).waitFor();
  await page.getByRole('searchbox', { name: 'Species' }).fill(species);
  await page.getByRole('searchbox', { name: 'Traits' }).fill(trait);
}

function cellOf(page: Page, taxonId: string, traitCode: string) {
  return page.locator(`[role="row"][data-taxon="${taxonId}"] [role="gridcell"][data-trait="${traitCode}"]`);
}

/** Fills the cell editor's four range fields. */
async function fillRange(page: Page, range: { min: number; low: number; high: number; max: number }): Promise<void> {
  const dialog = page.getByRole('dialog');
  await dialog.getByLabel('Smallest').fill(String(range.min));
  await dialog.getByLabel('Typical from').fill(String(range.low));
  await dialog.getByLabel('Typical to').fill(String(range.high));
  await dialog.getByLabel('Largest').fill(String(range.max));
}

/** Waits for the grid's active cell to be `id` (the page redraws a moment after the key press). */
async function expectActive(page: Page, id: string): Promise<void> {
  await page
    .waitForFunction((wanted) => document.querySelector('[role="grid"]')?.getAttribute('aria-activedescendant') === wanted, id, { timeout: 5_000 })
    .catch(() => undefined);
  expect(await page.getByRole('grid').getAttribute('aria-activedescendant')).to.equal(id);
}

interface AuditBody {
  entries: Array<{ entity: string; entityKey: string; reason: string; actor: { email: string | null }; after: unknown }>;
}

describe('e2e: the Matrix desk', function () {
  this.timeout(240_000);
  const running = browserSuite();

  it('a curator edits a cell with a reason in the grid and publishes; an anonymous sift sees the new edition; the change log lists it', async () => {
    const context = await running.newContext({ serviceWorkers: 'block', viewport: DESKTOP });
    const page = await context.newPage();
    const pageErrors: string[] = [];
    page.on('pageerror', (error) => pageErrors.push(error.message));
    await signIn(page, running.baseUrl, 'curator', '/desk');
    expect(await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Matrix desk' }).count()).to.equal(1);

    // the grid: grouped by plant part, species column and the unknown / inapplicable marks
    const grid = page.getByRole('grid', { name: /Working matrix/ });
    await grid.waitFor();
    const firstPart = (await page.locator('.head .part').first().textContent())?.trim();
    expect(firstPart).to.equal('Leaf');
    expect(await page.locator('[role="rowheader"] em').first().textContent()).to.not.equal('');
    await shoot(page, 'desk-grid');

    // keyboard: arrows move the active cell, Enter opens the editor, Escape cancels it
    await grid.focus();
    await expectActive(page, 'desk-cell-0-0');
    await page.keyboard.press('ArrowRight');
    await expectActive(page, 'desk-cell-0-1');
    await page.keyboard.press('ArrowDown');
    await expectActive(page, 'desk-cell-1-1');
    await page.keyboard.press('ArrowLeft');
    await page.keyboard.press('ArrowUp');
    await page.keyboard.press('ArrowUp');
    await expectActive(page, 'desk-cell-0-0');
    await page.keyboard.press('Enter');
    await page.getByRole('dialog').waitFor();
    await page.keyboard.press('Escape');
    await page.getByRole('dialog').waitFor({ state: 'detached' });

    // a far column is drawn only once scrolled to: the columns are windowed
    const columnCount = Number(await grid.getAttribute('aria-colcount')) - 1;
    const drawn = await page.locator('[role="row"][data-taxon] >> nth=0').locator('[role="gridcell"]').count();
    expect(drawn, 'only a window of the columns is drawn').to.be.lessThan(columnCount);
    await page.keyboard.press('Control+End');
    const last = `desk-cell-${Number(await grid.getAttribute('aria-rowcount')) - 3}-${columnCount - 1}`;
    await expectActive(page, last);
    await page.locator(`#${last}`).waitFor();
    expect(await page.locator(`#${last}`).count(), 'the last cell is drawn once the grid scrolled to it').to.equal(1);
    await page.keyboard.press('Control+Home');

    // edit pinus-taeda × needle-length: an out-of-order range is refused before anything is sent
    await showOnly(page, 'Pinus taeda', 'Needle length');
    const cell = cellOf(page, 'pinus-taeda', 'needle-length');
    await cell.waitFor();
    await cell.dblclick();
    const dialog = page.getByRole('dialog');
    await dialog.waitFor();
    await fillRange(page, { min: 10, low: 24, high: 23, max: 25 });
    await dialog.getByLabel('Reason').fill('Longest needles measured on herbarium sheets');
    await dialog.getByRole('button', { name: 'Save to the draft' }).click();
    expect(await dialog.getByRole('alert').first().textContent()).to.contain('smallest ≤ typical from ≤ typical to ≤ largest');
    await fillRange(page, { min: 10, low: 12, high: 23, max: 26 });
    expect(await seriousViolations(page), 'the cell editor').to.deep.equal([]);
    await shoot(page, 'desk-cell-editor');
    await dialog.getByRole('button', { name: 'Save to the draft' }).click();
    await dialog.waitFor({ state: 'detached' });
    expect((await cell.textContent())?.trim()).to.equal('10 (12–23) 26 cm');
    expect(await cell.getAttribute('aria-label')).to.equal('typically 12–23 cm, recorded 10–26 cm');

    // publish from the editions page
    await page.getByRole('navigation', { name: 'Matrix desk' }).getByRole('link', { name: 'Editions' }).click();
    const draft = page.locator('[data-draft-summary]');
    await draft.waitFor();
    expect(await draft.textContent()).to.contain('1 cell changed');
    await page.getByLabel('Title').fill('Loblolly needles rechecked');
    await page.getByLabel('Summary of the changes').fill('Longest loblolly needles from herbarium sheets');
    await shoot(page, 'desk-editions', true);
    await page.getByRole('button', { name: 'Publish…' }).click();
    const confirm = page.getByRole('dialog', { name: /Publish “Loblolly needles rechecked”/ });
    await confirm.waitFor();
    await confirm.getByRole('button', { name: 'Publish the edition' }).click();
    await page.locator('[data-notice]').waitFor();
    expect(await page.locator('[data-notice]').textContent()).to.contain('Edition 2');
    await page.locator('[data-edition="2"]').waitFor();
    expect(await page.locator('[data-edition="2"]').textContent()).to.contain('current');

    // an anonymous visitor in another browser context
    const visitor = await running.newContext({ serviceWorkers: 'block', viewport: PHONE });
    const list = await visitor.request.get(`${running.baseUrl}/api/v1/editions`);
    expect(((await list.json()) as { current: number }).current).to.equal(2);
    const taxon = (await (await visitor.request.get(`${running.baseUrl}/api/v1/taxa/pinus-taeda`)).json()) as {
      edition: { id: number };
      traits: Array<{ trait: string; range?: unknown }>;
    };
    expect(taxon.edition.id).to.equal(2);
    expect(taxon.traits.find((trait) => trait.trait === 'needle-length')?.range).to.deep.equal({ min: 10, low: 12, high: 23, max: 26 });
    const sift = await visitor.newPage();
    await sift.goto(`${running.baseUrl}/sift`);
    await sift.locator('sv-edition-status [data-state="online"]').waitFor();
    expect(await sift.locator('sv-edition-status').textContent()).to.contain('Edition 2');

    // the change log lists the edit and the edition
    await page.getByRole('navigation', { name: 'Matrix desk' }).getByRole('link', { name: 'Change log' }).click();
    const row = page.locator('tr[data-change]', { hasText: 'Longest needles measured on herbarium sheets' });
    await row.waitFor();
    const text = (await row.textContent()) ?? '';
    expect(text).to.contain('pinus-taeda').and.to.contain('needle-length').and.to.contain(demoAccount('curator').email);
    expect(text).to.contain('recorded 10–26 cm');
    expect(await page.locator('tr[data-change]', { hasText: 'Longest loblolly needles from herbarium sheets' }).count()).to.equal(1);
    expect(pageErrors).to.deep.equal([]);
  });

  it('two curators edit the same cell: the second sees both values, re-bases, and both changes are in the change log', async () => {
    const pages: Page[] = [];
    for (const role of ['curator', 'admin']) {
      const context: BrowserContext = await running.newContext({ serviceWorkers: 'block', viewport: DESKTOP });
      const page = await context.newPage();
      await signIn(page, running.baseUrl, role, '/desk');
      await showOnly(page, 'Pinus echinata', 'Needle length');
      await cellOf(page, 'pinus-echinata', 'needle-length').dblclick();
      await page.getByRole('dialog').waitFor();
      pages.push(page);
    }
    const [first, second] = pages as [Page, Page];
    await fillRange(first, { min: 5, low: 7, high: 11, max: 13 });
    await first.getByRole('dialog').getByLabel('Reason').fill('Shortleaf needles from the state guide');
    await first.getByRole('dialog').getByRole('button', { name: 'Save to the draft' }).click();
    await first.getByRole('dialog').waitFor({ state: 'detached' });

    await fillRange(second, { min: 6, low: 8, high: 11, max: 12 });
    await second.getByRole('dialog').getByLabel('Reason').fill('Shortleaf needles measured in the herbarium');
    await second.getByRole('dialog').getByRole('button', { name: 'Save to the draft' }).click();
    const stale = second.locator('[data-stale]');
    await stale.waitFor();
    expect(await stale.locator('[data-cell="current"]').textContent()).to.equal('typically 7–11 cm, recorded 5–13 cm');
    expect(await stale.locator('[data-cell="mine"]').textContent()).to.equal('typically 8–11 cm, recorded 6–12 cm');
    // nothing typed is lost
    expect(await second.getByRole('dialog').getByLabel('Reason').inputValue()).to.equal('Shortleaf needles measured in the herbarium');
    expect(await second.getByRole('dialog').getByLabel('Largest').inputValue()).to.equal('12');
    expect(await seriousViolations(second), 'the stale edit').to.deep.equal([]);
    await shoot(second, 'desk-cell-editor-stale');
    await stale.getByRole('button', { name: /Keep mine, based on version/ }).click();
    await second.getByRole('dialog').getByRole('button', { name: 'Save to the draft' }).click();
    await second.getByRole('dialog').waitFor({ state: 'detached' });
    expect((await cellOf(second, 'pinus-echinata', 'needle-length').textContent())?.trim()).to.equal('6 (8–11) 12 cm');

    const token = await tokenFor(second.context().request, running.baseUrl, 'curator');
    const audit = await second
      .context()
      .request.get(`${running.baseUrl}/api/v1/curation/audit?entity=cell&key=${encodeURIComponent('pinus-echinata/needle-length')}`, {
        headers: { Authorization: `Bearer ${token}` },
      });
    expect(audit.status(), await audit.text()).to.equal(200);
    const entries = ((await audit.json()) as AuditBody).entries;
    expect(entries.map((entry) => entry.reason)).to.deep.equal(['Shortleaf needles measured in the herbarium', 'Shortleaf needles from the state guide']);
    expect(entries.map((entry) => entry.actor.email)).to.deep.equal([demoAccount('admin').email, demoAccount('curator').email]);

    await second.goto(`${running.baseUrl}/desk/changes`);
    await second.locator('tr[data-change]', { hasText: 'Shortleaf needles measured in the herbarium' }).waitFor();
    expect(await second.locator('tr[data-change]', { hasText: 'Shortleaf needles from the state guide' }).count()).to.equal(1);
  });

  it('a learner who opens the desk is sent home, and the API refuses them', async () => {
    const page = await running.newPage({ serviceWorkers: 'block', viewport: PHONE });
    await signIn(page, running.baseUrl, 'learner', '/study');
    expect(await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Matrix desk' }).count()).to.equal(0);
    await page.goto(`${running.baseUrl}/desk`);
    await page.waitForURL((url) => url.pathname === '/');
    expect(await page.getByRole('grid').count()).to.equal(0);
    const token = await tokenFor(page.context().request, running.baseUrl, 'learner');
    for (const url of ['/api/v1/curation/matrix', '/api/v1/curation/audit', '/api/v1/curation/draft/summary']) {
      const res = await page.context().request.get(`${running.baseUrl}${url}`, { headers: { Authorization: `Bearer ${token}` } });
      expect(res.status(), url).to.equal(403);
    }
  });

  for (const colorScheme of ['light', 'dark'] as const) {
    it(`axe finds nothing serious on the desk's screens in the ${colorScheme} scheme; the change log fits 360 px`, async () => {
      const context = await running.newContext({ serviceWorkers: 'block', viewport: DESKTOP, colorScheme });
      const page = await context.newPage();
      await signIn(page, running.baseUrl, 'curator', '/desk');
      await page.getByRole('grid', { name: /Working matrix/ }).waitFor();
      expect(await seriousViolations(page), 'the grid').to.deep.equal([]);
      if (colorScheme === 'dark') await shoot(page, 'desk-grid-dark');
      await cellOf(page, (await page.locator('[role="row"][data-taxon]').first().getAttribute('data-taxon')) ?? '', 'foliage').dblclick();
      await page.getByRole('dialog').waitFor();
      expect(await seriousViolations(page), 'the cell editor').to.deep.equal([]);
      if (colorScheme === 'dark') await shoot(page, 'desk-cell-editor-dark');
      await page.keyboard.press('Escape');
      await page.getByRole('dialog').waitFor({ state: 'detached' });
      await page.goto(`${running.baseUrl}/desk/editions`);
      await page.locator('[data-draft-summary]').waitFor();
      expect(await seriousViolations(page), 'the editions page').to.deep.equal([]);
      await page.goto(`${running.baseUrl}/desk/changes`);
      await page.locator('tr[data-change]').first().waitFor();
      expect(await seriousViolations(page), 'the change log').to.deep.equal([]);
      if (colorScheme === 'dark') await shoot(page, 'desk-changes-dark');
      await page.setViewportSize(PHONE);
      await page.locator('tr[data-change]').first().waitFor();
      await expectNoSidewaysOverflow(page, 'the change log at 360 px');
      expect(await seriousViolations(page), 'the change log at 360 px').to.deep.equal([]);
      if (colorScheme === 'light') await shoot(page, 'desk-changes-phone', true);
    });
  }
});
