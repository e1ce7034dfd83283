import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { expect } from 'chai';
import type { Browser, BrowserContext, Page } from 'playwright-core';
import { launchBrowser, requireChromium } from './support/browser';
import { demoAccount, expectNoSidewaysOverflow, seriousViolations } from './support/checks';
import { mailedLinkPath } from './support/mail';
import { SCREENSHOT_DIR, startBuiltApp, type RunningApp } from './support/server';
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../../api/src/db/seeders/0002-demo-scenario';

const PHONE = { width: 390, height: 844 };
const NARROW = { width: 360, height: 780 };
const DESKTOP = { width: 1280, height: 900 };

/** The demo partner developer (a learner: any signed-in user may hold partner keys). */
const PARTNER = DEMO_ACCOUNTS.find((account) => account.email === 'leo@fernway-trails.example');

const IDENTIFY_BODY = { observations: [{ trait: 'needles-per-fascicle', values: [3] }] };

const squash = (text: string | null) => (text ?? '').replace(/\s+/g, ' ').trim();

async function shoot(page: Page, name: string, fullPage = true): Promise<void> {
  fs.mkdirSync(SCREENSHOT_DIR, { recursive: true });
  await page.screenshot({ path: path.join(SCREENSHOT_DIR, `${name}.png`), fullPage });
}

/** Axe's serious violations once running animations (a dialog opening, a panel expanding) have ended. */
async function violationsWhenStill(page: Page): Promise<string[]> {
  await page.waitForFunction(() => document.getAnimations().every((animation) => animation.playState !== 'running'), undefined, { timeout: 5_000 });
  return seriousViolations(page);
}

/** Signs in through the sign-in page as `email` and lands on `next`. */
async function signIn(page: Page, baseUrl: string, email: string, next: string): Promise<void> {
  await page.goto(`${baseUrl}/sign-in?next=${encodeURIComponent(next)}`);
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(DEMO_PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((url) => url.pathname === next);
}

describe('e2e: Partner keys and Admin', function () {
  this.timeout(240_000);
  let browser: Browser;
  let running: RunningApp;
  let context: BrowserContext;
  let backupDir: string;

  before(async function () {
    requireChromium(this);
    backupDir = fs.mkdtempSync(path.join(os.tmpdir(), 'sylvasift-e2e-backups-'));
    running = await startBuiltApp({ BACKUP_DIR: backupDir });
    browser = await launchBrowser();
  });

  afterEach(async () => {
    await context?.close();
  });

  after(async () => {
    await browser?.close();
    await running?.stop();
    if (backupDir) fs.rmSync(backupDir, { recursive: true, force: true });
  });

  it('a partner developer creates a key, calls identify with it, sees the call in the usage, and after revoking it the call is refused', async () => {
    if (!PARTNER) throw new Error('no demo partner developer');
    context = await browser.newContext({ serviceWorkers: 'block', viewport: PHONE });
    const page = await context.newPage();
    const pageErrors: string[] = [];
    page.on('pageerror', (error) => pageErrors.push(error.message));

    await signIn(page, running.baseUrl, PARTNER.email, '/keys');
    await page.getByRole('heading', { name: 'Partner keys', level: 1 }).waitFor();
    expect(await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Partner keys' }).count()).to.equal(1);
    // a learner is not offered Admin
    expect(await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Admin' }).count()).to.equal(0);
    expect(await page.locator('#main').getByRole('link', { name: 'API documentation' }).getAttribute('href')).to.equal('/api/docs');

    // A name is required; the scopes stay as chosen when the form refuses.
    await page.getByRole('checkbox', { name: /lookup/ }).uncheck();
    await page.getByRole('button', { name: 'Create key' }).click();
    expect(squash(await page.locator('mat-error').first().textContent())).to.equal('Give the key a name.');
    expect(await page.getByRole('checkbox', { name: /lookup/ }).isChecked()).to.equal(false);
    await page.getByRole('checkbox', { name: /identify/ }).uncheck();
    await page.getByLabel('What the key is for').fill('Fernway Trails field test');
    await page.getByRole('button', { name: 'Create key' }).click();
    expect(squash(await page.locator('#scope-problem').textContent())).to.equal('Pick at least one.');
    expect(await page.getByLabel('What the key is for').inputValue()).to.equal('Fernway Trails field test');
    await page.getByRole('checkbox', { name: /identify/ }).check();
    await page.getByRole('button', { name: 'Create key' }).click();

    const created = page.locator('section.created');
    await created.waitFor();
    expect(squash(await created.textContent())).to.contain('it will not be shown again');
    // the emptied form is ready for another key, with no error left over from the refusals
    expect(await page.locator('mat-error').count()).to.equal(0);
    const key = squash(await created.locator('.token').textContent());
    expect(key).to.match(/^svk_[A-Za-z0-9_-]{43}$/);
    const curl = squash(await created.locator('.curl').textContent());
    expect(curl).to.equal(
      `curl -H 'Authorization: Bearer ${key}' -H 'Content-Type: application/json' -d '${JSON.stringify(IDENTIFY_BODY)}' ${running.baseUrl}/api/v1/identify`,
    );
    await created.getByRole('button', { name: 'Copy key' }).click();
    await created.getByText('The key is copied.').waitFor();
    await expectNoSidewaysOverflow(page, 'the keys page with a new key');
    await shoot(page, 'keys-created-phone');

    // The key works: the same identify call the page offers, made from here.
    const call = () => page.request.post(`${running.baseUrl}/api/v1/identify`, { headers: { Authorization: `Bearer ${key}` }, data: IDENTIFY_BODY });
    const answer = await call();
    expect(answer.status(), await answer.text()).to.equal(200);
    const ranked = (await answer.json()) as { candidates: Array<{ taxon: { id: string } }> };
    // Loblolly pine has its needles in bundles of three (Flora of North America vol. 2, Pinus taeda; from memory)
    expect(ranked.candidates.slice(0, 6).map((c) => c.taxon.id)).to.include('pinus-taeda');

    // The new key's usage opened with it; after a refresh it shows today's call.
    const card = page.locator(`li.key[data-key-id]`).filter({ hasText: 'Fernway Trails field test' });
    await card.getByRole('button', { name: 'Refresh usage' }).click();
    const chart = card.getByRole('img');
    await page.waitForFunction(() => /1 request today/.test(document.querySelector('li.key svg[role="img"]')?.getAttribute('aria-label') ?? ''));
    expect(await chart.getAttribute('aria-label')).to.equal(
      `Fernway Trails field test: 1 request in the last 30 days, the most on ${new Date().toLocaleDateString('en-GB', { day: 'numeric', month: 'long', timeZone: 'UTC' })} (1 request); 1 request today.`,
    );
    expect(squash(await card.locator('.quota').textContent())).to.match(/^4,999 of 5,000 requests left in today's quota/);
    await card.getByRole('button', { name: 'Show as a table' }).click();
    const table = card.getByRole('table');
    // wait for the table to be drawn (its thirtieth day), then count
    await table.locator('tbody tr').nth(29).waitFor();
    expect(await table.locator('tbody tr').count()).to.equal(30);
    expect(squash(await table.locator('tbody tr').first().locator('td').textContent())).to.equal('1');
    expect(await violationsWhenStill(page), 'keys page with usage, light').to.deep.equal([]);
    await expectNoSidewaysOverflow(page, 'the keys page with the usage table');

    // Revoking asks first; going back changes nothing.
    await card.getByRole('button', { name: /^Revoke…/ }).click();
    const dialog = page.getByRole('dialog', { name: 'Revoke “Fernway Trails field test”?' });
    await dialog.waitFor();
    expect(await violationsWhenStill(page), 'revoke dialog').to.deep.equal([]);
    await shoot(page, 'keys-revoke-dialog-phone', false);
    await dialog.getByRole('button', { name: 'Go back' }).click();
    await dialog.waitFor({ state: 'detached' });
    expect((await call()).status()).to.equal(200);

    await card.getByRole('button', { name: /^Revoke…/ }).click();
    await dialog.getByRole('button', { name: 'Revoke key' }).click();
    await card.locator('.revoked-badge').waitFor();
    expect(squash(await page.locator('section.created').count().then(String))).to.equal('0');
    const refused = await call();
    expect(refused.status()).to.equal(401);
    expect(refused.headers()['www-authenticate']).to.contain('invalid_token');
    expect(pageErrors).to.deep.equal([]);
  });

  it('an admin invites a curator who accepts, changes a role, and makes, downloads and restores a backup', async () => {
    context = await browser.newContext({ serviceWorkers: 'block', viewport: DESKTOP, acceptDownloads: true });
    const page = await context.newPage();
    const pageErrors: string[] = [];
    page.on('pageerror', (error) => pageErrors.push(error.message));
    const admin = demoAccount('admin');
    await signIn(page, running.baseUrl, admin.email, '/admin');
    await page.getByRole('heading', { name: 'Admin', level: 1 }).waitFor();
    const nav = page.getByRole('navigation', { name: 'Main' });
    expect(await nav.getByRole('link', { name: 'Admin' }).count()).to.equal(1);
    expect(await nav.getByRole('link', { name: 'Partner keys' }).count()).to.equal(1);

    // An address the server refuses keeps what was typed and says why beside the field.
    const email = `wren.ashcombe-${Date.now()}@sylvasift-demo.example`;
    await page.getByLabel('E-mail address').fill('not an address');
    await page.getByRole('button', { name: 'Send invitation' }).click();
    expect(squash(await page.locator('mat-error').first().textContent())).to.equal('That is not an e-mail address.');
    await page.getByLabel('E-mail address').fill(email);
    await page.getByRole('combobox', { name: 'Role', exact: true }).click();
    await page.getByRole('option', { name: 'Curator' }).click();
    await page.getByRole('button', { name: 'Send invitation' }).click();
    await page.getByText(`Invitation sent to ${email} as curator.`).waitFor();
    expect(await page.getByRole('link', { name: 'mail caught in development' }).count()).to.equal(1);

    // The mail is in the development mailbox, and its link makes the account.
    const linkPath = await mailedLinkPath(page.request, running.baseUrl, email, 'invited', 'invitation');
    const invitee = await browser.newContext({ serviceWorkers: 'block', viewport: PHONE });
    try {
      const inviteePage = await invitee.newPage();
      await inviteePage.goto(`${running.baseUrl}${linkPath}`);
      await inviteePage.getByLabel('Name shown to others').fill('Wren Ashcombe');
      await inviteePage.getByLabel('Password').fill('a curator sized password');
      await inviteePage.getByRole('button', { name: 'Create my account' }).click();
      await inviteePage.waitForURL(/\/account$/);
      expect(await inviteePage.locator('.facts .role').textContent()).to.equal('curator');
    } finally {
      await invitee.close();
    }

    // The new curator shows up; the search finds them; their role changes to reviewer.
    await page.reload();
    await page.getByLabel('Find by name or e-mail').fill('wren');
    const row = page.locator('tr[data-person-id]');
    await page.waitForFunction(() => document.querySelectorAll('tr[data-person-id]').length === 1);
    expect(squash(await row.textContent()))
      .to.contain('Wren Ashcombe')
      .and.to.contain(email);
    await row.getByRole('combobox', { name: 'Role of Wren Ashcombe' }).click();
    await page.getByRole('option', { name: 'Reviewer' }).click();
    await page.getByText('Wren Ashcombe is now reviewer.').waitFor();
    const wren = await running.created.context.models.User.findOne({ where: { email } });
    expect(wren?.role).to.equal('reviewer');
    expect(await violationsWhenStill(page), 'admin people, light').to.deep.equal([]);

    // Every partner key: the demo partner's key is there with its owner.
    await page.getByRole('tab', { name: 'Partner keys' }).click();
    const keyRows = page.locator('tr[data-key-id]');
    await keyRows.first().waitFor();
    expect(squash(await page.locator('table').textContent())).to.contain('leo@fernway-trails.example');
    expect(await violationsWhenStill(page), 'admin keys, light').to.deep.equal([]);

    // Backups: make one, download it, change something, restore it by typing its name.
    await page.getByRole('tab', { name: 'Backups' }).click();
    await page.getByRole('button', { name: 'Make a backup now' }).click();
    const made = page.locator('.done', { hasText: /^Backup sylvasift-/ });
    await made.waitFor();
    const name = /sylvasift-\d{8}T\d{9}Z-[a-f0-9]{6}\.sqlite/.exec((await made.textContent()) ?? '')?.[0] ?? '';
    expect(name).to.not.equal('');
    const backupRow = page.locator(`tr[data-backup="${name}"]`);
    await backupRow.waitFor();
    const [download] = await Promise.all([page.waitForEvent('download'), backupRow.getByRole('button', { name: /^Download/ }).click()]);
    expect(download.suggestedFilename()).to.equal(name);
    const saved = await download.path();
    // the SQLite file header (sqlite.org, Database File Format §1.3)
    expect(fs.readFileSync(saved).subarray(0, 16).toString('latin1')).to.equal('SQLite format 3\0');
    expect(await violationsWhenStill(page), 'admin backups, light').to.deep.equal([]);
    await shoot(page, 'admin-backups-desktop');

    await running.created.context.models.User.update({ role: 'coach' }, { where: { email } });
    await backupRow.getByRole('button', { name: /^Restore…/ }).click();
    const dialog = page.getByRole('dialog', { name: 'Restore this backup?' });
    await dialog.waitFor();
    expect(squash(await dialog.textContent()))
      .to.contain('partner keys and their usage')
      .and.to.contain('Whatever was done since then is lost');
    const replace = dialog.getByRole('button', { name: 'Replace everything' });
    expect(await replace.isDisabled()).to.equal(true);
    await dialog.getByLabel('Name of the backup to restore').fill(name.slice(0, -1));
    expect(await replace.isDisabled()).to.equal(true);
    expect(await violationsWhenStill(page), 'restore dialog').to.deep.equal([]);
    await shoot(page, 'admin-restore-dialog-desktop', false);
    await dialog.getByLabel('Name of the backup to restore').fill(name);
    await replace.click();
    await page.getByText(`Restored from ${name}.`).waitFor();
    // the role is back to what it was when the backup was made
    expect((await running.created.context.models.User.findOne({ where: { email } }))?.role).to.equal('reviewer');
    expect(pageErrors).to.deep.equal([]);
  });

  it('a learner who opens /admin is sent home, and the API refuses them with 403', async () => {
    context = await browser.newContext({ serviceWorkers: 'block', viewport: PHONE });
    const page = await context.newPage();
    const learner = demoAccount('learner');
    await signIn(page, running.baseUrl, learner.email, '/keys');
    await page.goto(`${running.baseUrl}/admin`);
    await page.waitForURL(`${running.baseUrl}/`);
    expect(await page.getByRole('heading', { name: 'Admin', level: 1 }).count()).to.equal(0);
    const token = await page.evaluate(() => localStorage.getItem('sylvasift.session'));
    expect(token).to.be.a('string');
    for (const url of ['/api/v1/admin/users', '/api/v1/admin/keys', '/api/v1/admin/backups']) {
      const res = await page.request.get(`${running.baseUrl}${url}`, { headers: { Authorization: `Bearer ${token}` } });
      expect(res.status(), url).to.equal(403);
    }
    // A visitor is sent to sign in, and comes back to the page after.
    await page.evaluate(() => localStorage.clear());
    await page.goto(`${running.baseUrl}/keys`);
    await page.waitForURL(/\/sign-in\?next=%2Fkeys$/);
  });

  for (const colorScheme of ['light', 'dark'] as const) {
    it(`the keys and admin screens have no serious axe violations in ${colorScheme}, fit 360 px, and are shot for a look`, async () => {
      if (!PARTNER) throw new Error('no demo partner developer');
      for (const viewport of [NARROW, PHONE, DESKTOP]) {
        context = await browser.newContext({ serviceWorkers: 'block', viewport, colorScheme });
        try {
          const page = await context.newPage();
          const size = viewport === DESKTOP ? 'desktop' : String(viewport.width);
          await signIn(page, running.baseUrl, PARTNER.email, '/keys');
          // the demo partner's seeded key, with its usage open
          const card = page.locator('li.key').first();
          await card.waitFor();
          await card.getByRole('button', { name: /^Usage/ }).click();
          await card.getByRole('img').waitFor();
          await expectNoSidewaysOverflow(page, `the keys page at ${viewport.width} px`);
          expect(await violationsWhenStill(page), `keys page, ${colorScheme}, ${size}`).to.deep.equal([]);
          await shoot(page, `keys-${colorScheme}-${size}`);

          await page.evaluate(() => localStorage.clear());
          await signIn(page, running.baseUrl, demoAccount('admin').email, '/admin');
          await page.locator('tr[data-person-id]').first().waitFor();
          expect(await violationsWhenStill(page), `admin people, ${colorScheme}, ${size}`).to.deep.equal([]);
          await expectNoSidewaysOverflow(page, `the admin page at ${viewport.width} px`);
          await shoot(page, `admin-${colorScheme}-${size}`);
          await page.getByRole('tab', { name: 'Partner keys' }).click();
          await page.locator('tr[data-key-id]').first().waitFor();
          expect(await violationsWhenStill(page), `admin keys, ${colorScheme}, ${size}`).to.deep.equal([]);
          await page.getByRole('tab', { name: 'Backups' }).click();
          await page.getByRole('button', { name: 'Make a backup now' }).waitFor();
          expect(await violationsWhenStill(page), `admin backups, ${colorScheme}, ${size}`).to.deep.equal([]);
          if (viewport !== NARROW) await shoot(page, `admin-backups-${colorScheme}-${size}`);
        } finally {
          await context.close();
        }
      }
    });
  }
});
