import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { expect } from 'chai';
import type { Browser } from 'playwright-core';
import { createApp, type CreatedApp } from '../../api/src/app';
import { loadConfig } from '../../api/src/config';
import { launchBrowser, requireChromium } from './support/browser';
import { WEB_ROOT } from './support/server';
import { waitForSift } from './support/sift-page';

/** build output whose name carries a content hash */
const HASHED = /-[A-Z0-9]{8}\.(js|css|woff2)(\?|$)/;

describe('e2e: a repeat visit', function () {
  this.timeout(90_000);
  let browser: Browser;
  let created: CreatedApp;
  let server: http.Server;
  let base: string;
  /** every URL the server was asked for, as it arrived */
  const asked: string[] = [];

  before(async function () {
    requireChromium(this);
    created = await createApp(loadConfig({ NODE_ENV: 'test', WEB_ROOT }));
    server = http.createServer((req, res) => {
      asked.push(req.url ?? '');
      created.app(req, res);
    });
    await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', () => resolve()));
    base = `http://localhost:${(server.address() as AddressInfo).port}`;
    browser = await launchBrowser();
  });
  after(async () => {
    await browser?.close();
    await new Promise<void>((resolve) => {
      if (!server) return resolve();
      server.close(() => resolve());
      server.closeAllConnections();
    });
    await created?.close();
  });

  it('asks the server for no hashed asset again, and got the first ones compressed', async () => {
    const context = await browser.newContext({ viewport: { width: 390, height: 844 } });
    const page = await context.newPage();
    const encodings = new Map<string, string>();
    page.on('response', (response) => {
      if (!HASHED.test(response.url()) || response.fromServiceWorker()) return;
      const headers = response.headers();
      // A file smaller than a packet is sent as it is (the build compresses from 256 bytes up).
      encodings.set(response.url(), headers['content-encoding'] ?? (Number(headers['content-length']) < 256 ? 'too small to matter' : 'none'));
    });
    await page.goto(`${base}/sift`);
    await waitForSift(page);
    // The first visit installs the service worker, which prefetches the app shell.
    await page.evaluate(async () => {
      await navigator.serviceWorker.ready;
    });
    const scripts = [...encodings].filter(([url]) => /\.js(\?|$)/.test(url));
    expect(scripts.length).to.be.greaterThan(0);
    for (const [url, encoding] of scripts) expect(encoding, url).to.be.oneOf(['br', 'gzip', 'too small to matter']);
    expect(scripts.filter(([, encoding]) => encoding !== 'too small to matter').length).to.be.greaterThan(3);
    await page.waitForFunction(async () => (await caches.keys()).some((name) => name.includes('app-shell')), undefined, { timeout: 30_000 });
    await page.waitForTimeout(2_000);

    asked.length = 0;
    await page.goto(`${base}/sift`);
    await waitForSift(page);
    await page.waitForLoadState('networkidle');
    const hashedAgain = asked.filter((url) => HASHED.test(url));
    expect(hashedAgain, `fetched again: ${hashedAgain.join(', ')}`).to.deep.equal([]);
    await context.close();
  });
});
