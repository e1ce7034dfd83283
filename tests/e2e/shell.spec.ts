import fs from 'node:fs';
import path from 'node:path';
import { expect } from 'chai';
import { browserSuite } from './support/harness';
import { SCREENSHOT_DIR } from './support/server';

describe('e2e: the app shell', function () {
  this.timeout(60_000);
  const running = browserSuite();

  it('renders the top bar, navigation and safety footer with no console errors, fetching only from localhost', async () => {
    const page = await running.newPage({ viewport: { width: 1280, height: 800 } });
    const consoleErrors: string[] = [];
    const requests: string[] = [];
    page.on('console', (message) => {
      if (message.type() === 'error') consoleErrors.push(message.text());
    });
    page.on('pageerror', (error) => consoleErrors.push(error.message));
    page.on('request', (request) => requests.push(request.url()));

    await page.goto(running.baseUrl, { waitUntil: 'networkidle' });

    expect(await page.locator('header .brand-name').textContent()).to.equal('Sylvasift');
    expect(await page.locator('h1').first().textContent()).to.equal('Sylvasift');
    expect(await page.locator('nav[aria-label="Main"] a').count()).to.be.greaterThan(0);
    const footer = (await page.locator('footer').textContent()) ?? '';
    // The field-safety caution names the usual hazards of woods work (common practice, no source).
    expect(footer).to.match(/ticks/i);
    expect(footer).to.match(/poison ivy/i);
    expect(footer).to.match(/not a determination/i);

    // The theme font is our own copy of Noto Sans, loaded from /fonts.
    const bodyFont = await page.evaluate(() => getComputedStyle(document.body).fontFamily);
    expect(bodyFont).to.match(/Noto Sans/);
    await page.evaluate(() => document.fonts.ready);
    const notoLoaded = await page.evaluate(() => document.fonts.check('16px "Noto Sans"'));
    expect(notoLoaded).to.equal(true);
    expect(requests.some((url) => url.includes('/fonts/noto-sans/'))).to.equal(true);

    fs.mkdirSync(SCREENSHOT_DIR, { recursive: true });
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'shell-desktop.png'), fullPage: true });

    expect(consoleErrors, consoleErrors.join('\n')).to.deep.equal([]);
    const offHost = requests.filter((url) => {
      const { hostname, protocol } = new URL(url);
      return !(protocol === 'data:' || protocol === 'blob:' || hostname === 'localhost' || hostname === '127.0.0.1');
    });
    expect(offHost, `requests to other hosts: ${offHost.join(', ')}`).to.deep.equal([]);
    await page.close();
  });

  it('answers deep links with the app (history fallback) and unknown API routes with a problem', async () => {
    const page = await running.newPage();
    const response = await page.goto(`${running.baseUrl}/no/such/page`, { waitUntil: 'networkidle' });
    expect(response?.status()).to.equal(200);
    expect(await page.locator('h1').textContent()).to.equal('Page not found');
    const api = await page.request.get(`${running.baseUrl}/api/no-such-route`);
    expect(api.status()).to.equal(404);
    expect(api.headers()['content-type']).to.match(/^application\/problem\+json/);
    await page.close();
  });
});
