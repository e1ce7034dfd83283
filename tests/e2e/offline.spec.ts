import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { expect } from 'chai';
import type { BrowserContext, Page } from 'playwright-core';
import { browserSuite } from './support/harness';
import { WEB_ROOT } from './support/server';
import { openPart, seenSoFar, tapChip, waitForLeader, waitForSift } from './support/sift-page';

/** Waits until a service worker controls the page and has the edition bundle in its data cache. */
async function waitForOfflineReady(page: Page): Promise<void> {
  await page.evaluate(async () => {
    await navigator.serviceWorker.ready;
  });
  // The first load is not controlled yet; a reload goes through the worker, which caches the bundle.
  if (!(await page.evaluate(() => navigator.serviceWorker.controller !== null))) {
    await page.reload();
    await waitForSift(page);
  }
  // Offline needs the app shell (prefetched on install) and the bundle (cached by the data group).
  await page.waitForFunction(
    async () => {
      let shell = false;
      let bundle = false;
      for (const name of await caches.keys()) {
        const cache = await caches.open(name);
        shell ||= (await cache.match('/index.html', { ignoreVary: true })) !== undefined;
        bundle ||= (await cache.match('/api/v1/editions/current/bundle', { ignoreVary: true })) !== undefined;
      }
      return shell && bundle;
    },
    undefined,
    { timeout: 30_000, polling: 250 },
  );
  // A second visit, as a person makes: now the page itself is served by the worker's app version.
  await page.reload();
  await waitForSift(page);
}

describe('e2e: sifting offline', function () {
  this.timeout(90_000);
  const running = browserSuite();
  let context: BrowserContext;

  it('is installable: a manifest with our icons and a service worker', async () => {
    // the next test goes on offline in this same context, with its service worker installed
    context = await running.suiteContext({ viewport: { width: 1280, height: 900 } });
    const page = await context.newPage();
    const codings = new Map<string, string>();
    // On the context, so the requests the service worker makes itself (it may fetch the bundle once it
    // controls the page) count too; answers it served from its cache did not cross the network.
    context.on('response', (response) => {
      const url = new URL(response.url());
      if (!response.fromServiceWorker() && (/\.(js|css)$/.test(url.pathname) || url.pathname.endsWith('/editions/current/bundle'))) {
        const headers = response.headers();
        if (headers['content-encoding'] || Number(headers['content-length']) >= 256) codings.set(url.pathname, headers['content-encoding'] ?? 'none');
      }
    });
    await page.goto(`${running.baseUrl}/sift`);
    await waitForSift(page);
    // What came over the network came compressed: the scripts, the stylesheet and the edition bundle.
    expect(codings.get('/api/v1/editions/current/bundle')).to.be.oneOf(['br', 'gzip']);
    expect(
      [...codings.values()].filter((coding) => coding === 'none'),
      JSON.stringify([...codings]),
    ).to.deep.equal([]);
    const href = await page.locator('link[rel="manifest"]').getAttribute('href');
    const manifest = (await (await page.request.get(new URL(href ?? '', running.baseUrl).href)).json()) as {
      name: string;
      start_url: string;
      display: string;
      icons: Array<{ src: string; sizes: string; purpose?: string }>;
    };
    expect(manifest.name).to.equal('Sylvasift');
    expect(manifest.display).to.equal('standalone');
    // An installable web app needs a 192 px and a 512 px icon (common practice, no source).
    expect(manifest.icons.map((icon) => icon.sizes)).to.include.members(['192x192', '512x512']);
    for (const icon of manifest.icons) {
      const response = await page.request.get(new URL(icon.src, running.baseUrl).href);
      expect(response.status(), icon.src).to.equal(200);
    }
    await waitForOfflineReady(page);
  });

  it('with the network cut, a sift still works and says it is offline on edition N', async () => {
    const page = context.pages()[0];
    const edition = await page.request.get(`${running.baseUrl}/api/v1/editions`);
    const { current } = (await edition.json()) as { current: number };
    expect(current).to.be.a('number');

    await context.setOffline(true);
    await page.goto(`${running.baseUrl}/sift`);
    await waitForSift(page);
    const status = page.locator('sv-edition-status [data-state="offline"]');
    await status.waitFor({ timeout: 10_000 });
    expect((await status.textContent())?.replace(/\s+/g, ' ').trim()).to.equal(`cloud_off Offline — using edition ${current} saved on this device`);

    // Flora of North America vol. 2: Pinus strobus, needles 5 per fascicle (from memory).
    await openPart(page, 'Needle');
    await tapChip(page, 'needles-per-fascicle', 5);
    await waitForLeader(page, 'pinus-strobus');
    expect(await seenSoFar(page)).to.deep.equal(['Needles per bundle (fascicle): 5 per bundle']);

    // The species page is computed from the same bundle, so it opens offline too.
    await page.locator('sv-shortlist .candidate[data-taxon="pinus-strobus"] a.name').click();
    await page.locator('h1', { hasText: 'Eastern white pine' }).waitFor();
    expect(await page.locator('.traits .row[data-trait="needles-per-fascicle"] dd').textContent()).to.match(/5 per bundle/);
    await context.setOffline(false);
  });
});

describe('e2e: a new build of the app', function () {
  this.timeout(90_000);
  let webRoot: string;
  const running = browserSuite({
    env: () => {
      // A copy of the built app that the test can "redeploy" while a browser has the old one.
      webRoot = fs.mkdtempSync(path.join(os.tmpdir(), 'sylvasift-web-'));
      fs.cpSync(WEB_ROOT, webRoot, { recursive: true });
      return { WEB_ROOT: webRoot };
    },
  });

  // after the suite's own teardown, which stops the app serving this copy
  after(() => {
    if (webRoot) fs.rmSync(webRoot, { recursive: true, force: true });
  });

  it('is offered to a page running the old one, which reloads into it', async () => {
    const context = await running.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await context.newPage();
    await page.goto(`${running.baseUrl}/sift`);
    await waitForSift(page);
    await waitForOfflineReady(page);

    // Deploy: a changed index.html and a manifest listing its new hash, as `ng build` would write.
    const index = path.join(webRoot, 'index.html');
    const html = fs.readFileSync(index, 'utf8').replace('</body>', '<!-- build 2 --></body>');
    fs.writeFileSync(index, html);
    const manifestPath = path.join(webRoot, 'ngsw.json');
    const manifest = JSON.parse(fs.readFileSync(manifestPath, 'utf8')) as { timestamp: number; hashTable: Record<string, string> };
    manifest.timestamp += 1;
    manifest.hashTable['/index.html'] = crypto.createHash('sha1').update(html).digest('hex');
    fs.writeFileSync(manifestPath, JSON.stringify(manifest));

    await page.reload();
    const reload = page.getByRole('button', { name: 'Reload' });
    await reload.waitFor({ timeout: 30_000 });
    expect(await page.getByText('A new version of Sylvasift is ready.').count()).to.equal(1);
    await reload.click();
    await waitForSift(page);
    expect(await page.content()).to.contain('<!-- build 2 -->');
    await context.close();
  });
});
