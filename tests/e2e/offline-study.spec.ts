import fs from 'node:fs';
import path from 'node:path';
import { expect } from 'chai';
import type { BrowserContext, Page } from 'playwright-core';
import { demoAccount, expectNoSidewaysOverflow, seriousViolations } from './support/checks';
import { browserSuite } from './support/harness';
import { openPart, waitForSift } from './support/sift-page';
import { DEMO_PASSWORD } from '../../api/src/db/seeders/0002-demo-scenario';
import { DEMO_STUDY_SET } from '../../api/src/db/seeders/0003-demo-study-set';

/** Screens for a person to look at after a run. */
const SHOTS = path.resolve('test-results/screenshots');

/** A phone held upright, touch only (coarse pointer). */
const PHONE = { viewport: { width: 390, height: 844 }, hasTouch: true, isMobile: true };

async function shoot(page: Page, name: string): Promise<void> {
  fs.mkdirSync(SHOTS, { recursive: true });
  await page.screenshot({ path: path.join(SHOTS, `${name}.png`) });
}

/** Signs in through the page (the learner's own way in) and waits for `next`. */
async function signIn(page: Page, baseUrl: string, role: string, next: string): Promise<void> {
  const account = demoAccount(role);
  await page.goto(`${baseUrl}/sign-in?next=${encodeURIComponent(next)}`);
  await page.getByLabel('E-mail').fill(account.email);
  await page.getByLabel('Password').fill(DEMO_PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((url) => url.pathname + url.search === next);
}

/** The trait drawings the service worker's manifest lists for precaching, with their sizes. */
async function precachedDrawings(page: Page, baseUrl: string): Promise<Array<{ url: string; bytes: number }>> {
  const manifest = (await (await page.request.get(`${baseUrl}/ngsw.json`)).json()) as {
    assetGroups: Array<{ name: string; installMode: string; urls: string[] }>;
  };
  const group = manifest.assetGroups.find((candidate) => candidate.urls.some((url) => url.startsWith('/illustrations/')));
  expect(group?.installMode, 'the drawings are fetched when the app is installed').to.equal('prefetch');
  const urls = (group?.urls ?? []).filter((url) => url.endsWith('.svg'));
  return Promise.all(urls.map(async (url) => ({ url, bytes: (await (await page.request.get(`${baseUrl}${url}`)).body()).length })));
}

/** Waits until a service worker controls the page and holds the app shell, the edition bundle and every drawing. */
async function waitForOfflineReady(page: Page, drawings: readonly string[]): Promise<void> {
  await page.evaluate(async () => {
    await navigator.serviceWorker.ready;
  });
  if (!(await page.evaluate(() => navigator.serviceWorker.controller !== null))) await page.reload();
  await page.waitForFunction(
    async (wanted) => {
      const names = await caches.keys();
      // no named helpers in here: the test runner's transform would name them with a function the page lacks
      for (const url of ['/index.html', '/api/v1/editions/current/bundle', ...wanted]) {
        let found = false;
        for (const name of names) found ||= (await (await caches.open(name)).match(url, { ignoreVary: true })) !== undefined;
        if (!found) return false;
      }
      return true;
    },
    drawings,
    { timeout: 60_000, polling: 500 },
  );
}

/** The demo set's id, found through its coach, as the link the coach sends would carry it. */
async function demoSetId(page: Page, baseUrl: string): Promise<number> {
  const coach = demoAccount('coach');
  const session = await page.request.post(`${baseUrl}/api/v1/sessions`, { data: { email: coach.email, password: DEMO_PASSWORD } });
  const token = ((await session.json()) as { token: string }).token;
  const sets = (await (await page.request.get(`${baseUrl}/api/v1/study-sets`, { headers: { Authorization: `Bearer ${token}` } })).json()) as {
    studySets: Array<{ id: number; name: string }>;
  };
  const demo = sets.studySets.find((set) => set.name === DEMO_STUDY_SET.name);
  if (!demo) throw new Error('the demo study set is missing');
  return demo.id;
}

/** Every drawing on the page has loaded (a broken one has no natural width). */
async function brokenDrawings(page: Page): Promise<string[]> {
  return page
    .locator('img[src^="/illustrations/"]')
    .evaluateAll((images) =>
      (images as HTMLImageElement[]).filter((image) => !image.complete || image.naturalWidth === 0).map((image) => image.getAttribute('src') ?? ''),
    );
}

async function waitForDrawings(page: Page): Promise<void> {
  await page.waitForFunction(
    () => [...document.querySelectorAll<HTMLImageElement>('img[src^="/illustrations/"]')].every((image) => image.complete),
    undefined,
    { timeout: 10_000 },
  );
}

describe('e2e: studying on a phone, online and then offline', function () {
  this.timeout(150_000);
  const running = browserSuite();
  let context: BrowserContext;
  let setId = 0;

  it('a learner opens a shared set and a drill online; the Study page lists the set; answering keeps "Next question" on screen', async () => {
    context = await running.suiteContext(PHONE);
    const page = await context.newPage();
    const consoleErrors: string[] = [];
    page.on('console', (message) => {
      if (message.type() === 'error') consoleErrors.push(message.text());
    });
    page.on('pageerror', (error) => consoleErrors.push(error.message));
    expect(await page.evaluate(() => matchMedia('(pointer: coarse)').matches), 'the phone has a coarse pointer').to.equal(true);

    setId = await demoSetId(page, running.baseUrl);
    await signIn(page, running.baseUrl, 'learner', '/study');
    await page.locator('.explain').waitFor();
    expect(await page.locator('[data-shared-set]').count(), 'nothing opened yet').to.equal(0);

    await page.goto(`${running.baseUrl}/study/${setId}`);
    await page.locator('h1', { hasText: DEMO_STUDY_SET.name }).waitFor();
    await page.goto(`${running.baseUrl}/study`);
    const card = page.locator(`[data-shared-set="${setId}"]`);
    await card.waitFor();
    expect(await card.locator('.set-name').textContent()).to.contain(DEMO_STUDY_SET.name);
    expect(await card.getByRole('link', { name: /Drills/ }).getAttribute('href')).to.equal(`/study/${setId}/drill`);
    expect(await seriousViolations(page)).to.deep.equal([]);
    await expectNoSidewaysOverflow(page, 'the learner Study page');
    await shoot(page, 'study-page-shared-set-light');
    await page.emulateMedia({ colorScheme: 'dark' });
    await shoot(page, 'study-page-shared-set-dark');
    await page.emulateMedia({ colorScheme: 'light' });

    // The drawings are all precached when the service worker installs, not only once seen.
    const drawings = await precachedDrawings(page, running.baseUrl);
    const drawingFiles = fs.readdirSync('seeds/illustrations', { recursive: true }).filter((name) => String(name).endsWith('.svg'));
    expect(drawings.length, 'every drawing of the seeds').to.equal(drawingFiles.length);
    const total = drawings.reduce((sum, drawing) => sum + drawing.bytes, 0);
    // A first visit on a phone should not download more than a few hundred kB extra (common practice, no source).
    expect(total, `the drawings weigh ${total} bytes`).to.be.below(300_000);
    await waitForOfflineReady(
      page,
      drawings.map((drawing) => drawing.url),
    );

    await page.goto(`${running.baseUrl}/study/${setId}/drill?seed=5`);
    const heading = page.locator('#question-heading');
    await heading.waitFor();
    // A phone has no number keys to hand: no keyboard hints there.
    expect(await page.locator('.keys-hint').isVisible()).to.equal(false);
    expect(await page.locator('.choice .key').first().isVisible()).to.equal(false);

    const setOrder = DEMO_STUDY_SET.taxa as readonly string[];
    const choicesInOrder = async () => {
      const ids = await page.locator('.choice').evaluateAll((buttons) => buttons.map((button) => button.getAttribute('data-species') ?? ''));
      const places = ids.map((id) => setOrder.indexOf(id));
      expect(places, `choices ${ids.join(', ')} keep the set's order`).to.deep.equal([...places].sort((a, b) => a - b));
      return ids;
    };
    for (let question = 0; question < 3; question += 1) {
      await page.locator('[data-feedback]').waitFor({ state: 'detached' });
      await choicesInOrder();
      const before = await heading.boundingBox();
      await page.locator('.choice').first().tap();
      await page.locator('[data-feedback]').waitFor();
      const next = page.getByRole('button', { name: /Next question|See your score/ });
      const box = await next.boundingBox();
      expect(box, 'the next button is laid out').to.not.equal(null);
      expect((box?.y ?? 0) + (box?.height ?? 0), '"Next question" ends on screen').to.be.at.most(844);
      expect(box?.y ?? -1, '"Next question" starts on screen').to.be.at.least(0);
      expect(await page.evaluate(() => document.activeElement?.textContent?.trim())).to.match(/Next question|See your score/);
      // The question did not move when the answer came.
      expect((await heading.boundingBox())?.y).to.equal(before?.y);
      if (question === 0) {
        await expectNoSidewaysOverflow(page, 'drill feedback');
        await shoot(page, 'drill-after-answer-light');
        await page.emulateMedia({ colorScheme: 'dark' });
        await shoot(page, 'drill-after-answer-dark');
        await page.emulateMedia({ colorScheme: 'light' });
      }
      await next.tap();
    }
    expect(consoleErrors, 'no errors while answering').to.deep.equal([]);
  });

  it('with the network cut, the Study page, the drill, the study sheet and the drawings still work; signing in says it needs a connection', async () => {
    const page = context.pages()[0];
    await context.setOffline(true);
    try {
      // The Study page still knows who is signed in and lists the set opened online.
      await page.goto(`${running.baseUrl}/study`);
      await page.locator(`[data-shared-set="${setId}"]`).waitFor({ timeout: 15_000 });
      await page
        .locator(`[data-shared-set="${setId}"]`)
        .getByRole('link', { name: /Drills/ })
        .tap();
      await page.waitForURL(`${running.baseUrl}/study/${setId}/drill`);
      await page.locator('#question-heading').waitFor({ timeout: 15_000 });

      await page.goto(`${running.baseUrl}/study/${setId}/drill?seed=7`);
      await page.locator('#question-heading').waitFor({ timeout: 15_000 });
      expect(await page.locator('.problem').count(), 'no error shown').to.equal(0);
      await waitForDrawings(page);
      expect(await brokenDrawings(page)).to.deep.equal([]);
      await page.locator('.choice').nth(1).tap();
      await page.locator('[data-feedback]').waitFor();
      expect(await page.locator('[data-score]').textContent()).to.match(/^Score: [01] of 1$/);

      await page.goto(`${running.baseUrl}/study/${setId}/sheet`);
      await page.locator('.sheet-card').first().waitFor({ timeout: 15_000 });
      expect(await page.locator('.sheet-card').count()).to.equal(DEMO_STUDY_SET.taxa.length);
      await waitForDrawings(page);
      expect(await brokenDrawings(page)).to.deep.equal([]);

      // Drawings never shown online are there too: the needle chips of the sift page.
      await page.goto(`${running.baseUrl}/sift`);
      await waitForSift(page);
      await openPart(page, 'Needle');
      await waitForDrawings(page);
      expect(await page.locator('img[src^="/illustrations/"]').count()).to.be.greaterThan(0);
      expect(await brokenDrawings(page)).to.deep.equal([]);

      // Signing in needs the server: the page says so plainly.
      await page.goto(`${running.baseUrl}/sign-in`);
      const account = demoAccount('learner');
      await page.getByLabel('E-mail').fill(account.email);
      await page.getByLabel('Password').fill(DEMO_PASSWORD);
      await page.getByRole('button', { name: 'Sign in' }).click();
      const alert = page.locator('.problem[role="alert"]');
      await alert.waitFor();
      const text = (await alert.textContent()) ?? '';
      expect(text).to.match(/You are offline/);
      expect(text).to.match(/needs a connection/);
      expect(text).to.not.match(/server ran into a problem/i);
      // A sign-in that could not reach the server leaves the session already open.
      expect(await page.evaluate(() => localStorage.getItem('sylvasift.session'))).to.not.equal(null);
    } finally {
      await context.setOffline(false);
    }
  });

  it('on a phone the set editor speaks of arrows, not dragging, and Enter in the species search adds only a clear best match', async () => {
    const page = await running.newPage({ ...PHONE, serviceWorkers: 'block' });
    await signIn(page, running.baseUrl, 'coach', '/study/new');
    const search = page.getByRole('combobox', { name: 'Add a species by name' });
    await search.waitFor();
    const added = () => page.locator('.species-order .species-item').evaluateAll((items) => items.map((item) => item.getAttribute('data-species') ?? ''));

    // A typo in one of two maples that share a word: Sugar maple (Acer saccharum) is meant, not Silver maple.
    await search.fill('sugr maple');
    await page.getByRole('option', { name: /Sugar maple/ }).waitFor();
    expect(await page.getByRole('option').first().innerText(), 'the typo is nearest Sugar maple').to.match(/^Sugar maple/);
    await search.press('Enter');
    await page.locator('.species-order .species-item[data-species="acer-saccharum"]').waitFor({ timeout: 3_000 });
    expect(await added()).to.deep.equal(['acer-saccharum']);

    // "maple" alone fits several equally well: Enter shows the list and adds nothing.
    await search.fill('maple');
    const options = page.getByRole('option');
    // fresh matches for these words: Boxelder was not among those for "sugr maple"
    await page.getByRole('option', { name: /boxelder/i }).waitFor();
    expect(await options.count()).to.be.greaterThan(1);
    await search.press('Enter');
    await page.waitForTimeout(300);
    expect(await added()).to.deep.equal(['acer-saccharum']);
    expect(await page.getByRole('listbox').isVisible()).to.equal(true);
    await page.getByRole('option', { name: /Red maple/ }).tap();
    await page.locator('.species-order .species-item[data-species="acer-rubrum"]').waitFor({ timeout: 3_000 });

    // No drag handle shows on a touch phone, so the hint does not speak of one.
    const hint = page.locator('.order-hint');
    expect((await hint.innerText()).trim()).to.equal('Use the arrows to change the order.');
    expect(await page.locator('.species-item .handle').first().isVisible()).to.equal(false);
  });
});
