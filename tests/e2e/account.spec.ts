import { expect } from 'chai';
import sharp from 'sharp';
import { demoAccount } from './support/checks';
import { browserSuite } from './support/harness';
import { waitForSift } from './support/sift-page';
import { DEMO_PASSWORD } from '../../api/src/db/seeders/0002-demo-scenario';

describe('e2e: accounts and edition updates', function () {
  this.timeout(90_000);
  const running = browserSuite();

  it('guards the account page, signs up a learner, shows who is signed in and signs out', async () => {
    const context = await running.newContext({ serviceWorkers: 'block' });
    const page = await context.newPage();
    await page.goto(`${running.baseUrl}/account`);
    await page.waitForURL(/\/sign-in\?next=%2Faccount$/);
    await page.getByRole('link', { name: 'Create an account' }).click();
    await page.getByLabel('Name shown to others').fill('Wren Hollis');
    await page.getByLabel('E-mail').fill('wren.hollis@example.invalid');
    // Too short a password is refused in the form before anything is sent.
    await page.getByLabel('Password').fill('short');
    await page.getByRole('button', { name: 'Create account' }).click();
    await page.getByText('Use at least 10 characters.').waitFor();
    await page.getByLabel('Password').fill('a long enough field password');
    await page.getByRole('button', { name: 'Create account' }).click();
    await page.waitForURL(/\/account$/);
    await page.locator('.role').first().waitFor();
    expect(await page.locator('.facts .role').textContent()).to.equal('learner');
    expect((await page.locator('header .account-link').textContent())?.replace(/\s+/g, ' ').trim()).to.equal('account_circle Wren Hollis · learner');

    await page.getByRole('button', { name: 'Sign out' }).click();
    await page.waitForURL(`${running.baseUrl}/`);
    await page.locator('header a', { hasText: 'Sign in' }).waitFor();
    // Signing up again with the same address is refused with the server's reason, in words.
    await page.goto(`${running.baseUrl}/sign-up`);
    await page.getByLabel('Name shown to others').fill('Wren Hollis');
    await page.getByLabel('E-mail').fill('wren.hollis@example.invalid');
    await page.getByLabel('Password').fill('a long enough field password');
    await page.getByRole('button', { name: 'Create account' }).click();
    const problem = page.getByRole('alert');
    await problem.waitFor();
    // The problem+json detail is shown as is, not a status code.
    expect((await problem.textContent())?.trim()).to.equal('An account with this e-mail address exists already.');
    await context.close();
  });

  it('keeps the session across a reload, offline too, and forgets it once the server has ended it', async () => {
    const coach = demoAccount('coach');
    const context = await running.newContext({ serviceWorkers: 'block' });
    const page = await context.newPage();
    await page.goto(`${running.baseUrl}/sign-in?next=${encodeURIComponent('/account')}`);
    await page.getByLabel('E-mail').fill(coach.email);
    await page.getByLabel('Password').fill(DEMO_PASSWORD);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL(/\/account$/);
    await page.locator('.facts .role').waitFor();

    // a full page load of a guarded page keeps the session and asks the server who it is again
    const asked = page.waitForResponse((response) => response.url().endsWith('/api/v1/me'));
    await page.reload();
    expect((await asked).status()).to.equal(200);
    await page.locator('.facts .role').waitFor();
    expect(page.url()).to.equal(`${running.baseUrl}/account`);
    expect(await page.locator('.facts .role').textContent()).to.equal('coach');
    const token = await page.evaluate(() => localStorage.getItem('sylvasift.session'));
    expect(token).to.be.a('string');

    // the server unreachable while the page loads: the session is kept, not thrown away
    // The page counts its settled /api/v1/me calls one task after each settles, when every promise
    // reaction of the app's error handling has run: that count is the signal to wait for.
    await page.addInitScript(() => {
      const counter = window as unknown as { sylvasiftMeSettled: number };
      counter.sylvasiftMeSettled = 0;
      const original = window.fetch.bind(window);
      window.fetch = (input, init) => {
        const pending = original(input, init);
        const url = typeof input === 'string' ? input : input instanceof URL ? input.href : input.url;
        if (url.endsWith('/api/v1/me')) {
          pending.finally(() => setTimeout(() => counter.sylvasiftMeSettled++, 0)).catch(() => undefined);
        }
        return pending;
      };
    });
    await page.route('**/api/v1/me', (route) => route.abort('internetdisconnected'));
    const failed = page.waitForEvent('requestfailed', (request) => request.url().endsWith('/api/v1/me'));
    await page.goto(`${running.baseUrl}/sift`);
    await failed;
    await page.waitForFunction(() => (window as unknown as { sylvasiftMeSettled?: number }).sylvasiftMeSettled === 1);
    // the header still offers the account, not Sign in
    await page.locator('header .account-link').waitFor();
    expect(await page.locator('header a', { hasText: 'Sign in' }).count()).to.equal(0);
    expect(await page.evaluate(() => localStorage.getItem('sylvasift.session'))).to.equal(token);
    await page.unroute('**/api/v1/me');

    // the session ended on the server (signed out elsewhere): the next load forgets it
    const ended = await page.request.delete(`${running.baseUrl}/api/v1/sessions/current`, { headers: { authorization: `Bearer ${token}` } });
    expect(ended.status()).to.be.oneOf([200, 204]);
    const refused = page.waitForResponse((response) => response.url().endsWith('/api/v1/me'));
    await page.goto(`${running.baseUrl}/sift`);
    expect((await refused).status()).to.equal(401);
    await page.locator('header a', { hasText: 'Sign in' }).waitFor();
    expect(await page.evaluate(() => localStorage.getItem('sylvasift.session'))).to.equal(null);
    await context.close();
  });

  it('refuses a wrong password with a readable message and signs a curator in', async () => {
    const context = await running.newContext({ serviceWorkers: 'block' });
    const page = await context.newPage();
    const curator = demoAccount('curator');
    await page.goto(`${running.baseUrl}/sign-in`);
    await page.getByLabel('E-mail').fill(curator.email);
    await page.getByLabel('Password').fill('not the password at all');
    await page.getByRole('button', { name: 'Sign in' }).click();
    const problem = page.getByRole('alert');
    await problem.waitFor();
    expect(await problem.textContent()).to.match(/password is wrong/);

    await page.getByLabel('Password').fill(DEMO_PASSWORD);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL(/\/account$/);
    await page.locator('.facts .role').waitFor();
    expect(await page.locator('.facts .role').textContent()).to.equal('curator');
    expect((await page.locator('header .account-link').textContent())?.replace(/\s+/g, ' ').trim()).to.equal(`account_circle ${curator.displayName} · curator`);
    await context.close();
  });

  it('offers a newly published edition to an open sift and loads it', async () => {
    const context = await running.newContext({ serviceWorkers: 'block', viewport: { width: 1280, height: 900 } });
    const page = await context.newPage();
    await page.goto(`${running.baseUrl}/sift?o=needles-per-fascicle:5&season=leaf-on&leeway=2`);
    await waitForSift(page);
    const status = page.locator('sv-edition-status');
    const { current } = (await (await page.request.get(`${running.baseUrl}/api/v1/editions`)).json()) as { current: number };
    expect((await status.textContent())?.replace(/\s+/g, ' ')).to.contain(`Edition ${current}`);

    const curator = demoAccount('curator');
    const session = await page.request.post(`${running.baseUrl}/api/v1/sessions`, { data: { email: curator.email, password: DEMO_PASSWORD } });
    expect(session.status()).to.equal(201);
    const { token } = (await session.json()) as { token: string };
    // an edition needs a change: recode one cell of the working matrix (a test edit, not a fact)
    const cellUrl = `${running.baseUrl}/api/v1/curation/cells/pinus-taeda/needle-length`;
    const cell = (await (await page.request.get(cellUrl, { headers: { Authorization: `Bearer ${token}` } })).json()) as { version: number };
    const recoded = await page.request.put(cellUrl, {
      headers: { Authorization: `Bearer ${token}` },
      data: { value: { min: 10, low: 15, high: 23, max: 41 }, version: cell.version, reason: 'Something for the new edition to carry' },
    });
    expect(recoded.status(), await recoded.text()).to.equal(200);
    const published = await page.request.post(`${running.baseUrl}/api/v1/editions`, {
      headers: { Authorization: `Bearer ${token}` },
      data: { title: 'Eastern trees, spring check', reason: 'A new edition for the field client to pick up' },
    });
    expect(published.status(), await published.text()).to.equal(201);

    // Coming back online is when the field client asks whether a newer edition is out.
    await context.setOffline(true);
    await context.setOffline(false);
    const load = page.getByRole('button', { name: `Load edition ${current + 1}` });
    await load.waitFor({ timeout: 10_000 });
    await load.click();
    await page.locator('sv-edition-status [data-state="online"]', { hasText: `Edition ${current + 1}` }).waitFor();
    // The sift carries on with the same observations on the new edition.
    await page.locator('sv-shortlist .candidates > .candidate:first-child[data-taxon="pinus-strobus"]').waitFor();
    await context.close();
  });

  it('shows a photo a curator attached on the species page', async () => {
    const context = await running.newContext({ serviceWorkers: 'block', viewport: { width: 1280, height: 900 } });
    const page = await context.newPage();
    const curator = demoAccount('curator');
    const session = await page.request.post(`${running.baseUrl}/api/v1/sessions`, { data: { email: curator.email, password: DEMO_PASSWORD } });
    const { token } = (await session.json()) as { token: string };
    const image = await sharp({ create: { width: 96, height: 64, channels: 3, background: '#6b4f3a' } })
      .png()
      .toBuffer();
    const attached = await page.request.post(`${running.baseUrl}/api/v1/taxa/pinus-taeda/photos`, {
      headers: { Authorization: `Bearer ${token}` },
      multipart: { photo: { name: 'bark.png', mimeType: 'image/png', buffer: image }, caption: 'Bark plates on an old trunk', credit: 'Sylvasift test' },
    });
    expect(attached.status(), await attached.text()).to.equal(201);

    await page.goto(`${running.baseUrl}/species/pinus-taeda`);
    const figure = page.locator('.photos figure').first();
    await figure.waitFor();
    expect(await figure.locator('img').getAttribute('src')).to.match(/^\/api\/v1\/photos\//);
    expect(await figure.locator('img').getAttribute('alt')).to.equal('Bark plates on an old trunk');
    // The photo itself is served (the API re-encodes it) and decodes in the browser.
    await page.waitForFunction(() => {
      const img = document.querySelector<HTMLImageElement>('.photos img');
      return img !== null && img.complete && img.naturalWidth === 96;
    });
    expect(await figure.locator('.credit').textContent()).to.contain('Sylvasift test');
    await context.close();
  });
});
