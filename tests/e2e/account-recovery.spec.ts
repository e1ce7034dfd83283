import { expect } from 'chai';
import type { BrowserContext, Page } from 'playwright-core';
import { browserSuite } from './support/harness';
import { seriousViolations } from './support/checks';
import { mailedLinkPath } from './support/mail';
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../../api/src/db/seeders/0002-demo-scenario';

const SENT_NOTICE = "If an account uses that address, we've sent a link to it.";

let addressCount = 0;
const uniqueEmail = (who: string) => `${who}.${Date.now()}.${++addressCount}@example.invalid`;

const squash = (text: string | null) => (text ?? '').replace(/\s+/g, ' ').trim();

describe('e2e: password resets and invitations', function () {
  this.timeout(90_000);
  const running = browserSuite();
  let context: BrowserContext;

  async function signUpLearner(page: Page, email: string, password: string): Promise<void> {
    const res = await page.request.post(`${running.baseUrl}/api/v1/accounts`, { data: { email, password, displayName: 'Juniper Ashdown' } });
    expect(res.status(), await res.text()).to.equal(201);
  }

  async function requestResetInBrowser(page: Page, email: string): Promise<void> {
    await page.goto(`${running.baseUrl}/sign-in`);
    await page.getByRole('link', { name: 'Forgot your password?' }).click();
    await page.waitForURL(/\/forgot-password$/);
    await page.getByLabel('E-mail').fill(email);
    await page.getByRole('button', { name: 'Send the link' }).click();
    const sent = page.getByRole('status');
    await sent.waitFor();
    expect(squash(await sent.textContent())).to.contain(SENT_NOTICE);
    // The answer takes the focus, so a keyboard user is not left on a button that has gone.
    expect(await sent.evaluate((element) => element === document.activeElement)).to.equal(true);
  }

  it('mails a reset link that sets a new password once, then explains that the link is used', async () => {
    context = await running.newContext({ serviceWorkers: 'block', viewport: { width: 360, height: 740 } });
    const page = await context.newPage();
    const email = uniqueEmail('juniper');
    await signUpLearner(page, email, 'the first long password');

    await requestResetInBrowser(page, email);
    const linkPath = await mailedLinkPath(page.request, running.baseUrl, email, 'Reset', 'reset-password');
    await page.goto(`${running.baseUrl}${linkPath}`);
    await page.getByRole('heading', { name: 'Choose a new password' }).waitFor();

    // Too short, then two different passwords, are refused in the form before anything is sent.
    await page.getByLabel('New password', { exact: true }).fill('short');
    await page.getByLabel('New password again').fill('short');
    await page.getByRole('button', { name: 'Set new password' }).click();
    await page.getByText('Use at least 10 characters.').waitFor();
    await page.getByLabel('New password', { exact: true }).fill('a second long password');
    await page.getByLabel('New password again').fill('a second long passwort');
    await page.getByRole('button', { name: 'Set new password' }).click();
    await page.getByText('The two passwords are not the same.').waitFor();
    expect(page.url()).to.equal(`${running.baseUrl}${linkPath}`);

    await page.getByLabel('New password again').fill('a second long password');
    await page.getByRole('button', { name: 'Set new password' }).click();
    await page.waitForURL(/\/sign-in\?done=reset$/);
    expect(squash(await page.getByRole('status').textContent())).to.equal('Your password is changed. Sign in with the new one.');

    // The old password no longer works; the new one signs in.
    const old = await page.request.post(`${running.baseUrl}/api/v1/sessions`, { data: { email, password: 'the first long password' } });
    expect(old.status()).to.equal(401);
    await page.getByLabel('E-mail').fill(email);
    await page.getByLabel('Password').fill('a second long password');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL(/\/account$/);
    await page.locator('.facts .role').waitFor();
    expect(await page.locator('.facts .role').textContent()).to.equal('learner');

    // The same link a second time is refused with a way to ask for a new one.
    await page.goto(`${running.baseUrl}${linkPath}`);
    await page.getByLabel('New password', { exact: true }).fill('a third long password');
    await page.getByLabel('New password again').fill('a third long password');
    await page.getByRole('button', { name: 'Set new password' }).click();
    const gone = page.getByRole('alert');
    await gone.waitFor();
    expect(squash(await gone.textContent())).to.contain('This reset link cannot be used any more');
    expect(await page.getByLabel('New password', { exact: true }).count()).to.equal(0);
    await page.getByRole('link', { name: 'Send me a new link' }).click();
    await page.waitForURL(/\/forgot-password$/);
    await page.getByLabel('E-mail').waitFor();
    // The password the used link tried to set was not applied.
    const third = await page.request.post(`${running.baseUrl}/api/v1/sessions`, { data: { email, password: 'a third long password' } });
    expect(third.status()).to.equal(401);
  });

  it('answers an address without an account exactly as one with an account', async () => {
    context = await running.newContext({ serviceWorkers: 'block' });
    const page = await context.newPage();
    const known = uniqueEmail('known');
    await signUpLearner(page, known, 'a long enough password');
    await requestResetInBrowser(page, known);
    const knownAnswer = squash(await page.getByRole('status').textContent());
    await requestResetInBrowser(page, uniqueEmail('nobody'));
    expect(squash(await page.getByRole('status').textContent())).to.equal(knownAnswer);
  });

  it('accepts an admin invitation in the browser, signs the new coach in, and refuses the link after', async () => {
    context = await running.newContext({ serviceWorkers: 'block', viewport: { width: 360, height: 740 } });
    const page = await context.newPage();
    const admin = DEMO_ACCOUNTS.find((account) => account.role === 'admin');
    if (!admin) throw new Error('no demo admin');
    const session = await page.request.post(`${running.baseUrl}/api/v1/sessions`, { data: { email: admin.email, password: DEMO_PASSWORD } });
    expect(session.status(), await session.text()).to.equal(201);
    const { token } = (await session.json()) as { token: string };
    const email = uniqueEmail('tamsin');
    const invited = await page.request.post(`${running.baseUrl}/api/v1/admin/invitations`, {
      headers: { Authorization: `Bearer ${token}` },
      data: { email, role: 'coach' },
    });
    expect(invited.status(), await invited.text()).to.equal(201);

    const linkPath = await mailedLinkPath(page.request, running.baseUrl, email, 'invited', 'invitation');
    await page.goto(`${running.baseUrl}${linkPath}`);
    await page.getByRole('heading', { name: 'Accept your invitation' }).waitFor();
    await page.getByRole('button', { name: 'Create my account' }).click();
    await page.getByText('Enter a name.').waitFor();
    await page.getByLabel('Name shown to others').fill('Tamsin Orchardley');
    await page.getByLabel('Password').fill('a coach sized password');
    await page.getByRole('button', { name: 'Create my account' }).click();
    await page.waitForURL(/\/account$/);
    await page.locator('.facts .role').waitFor();
    expect(await page.locator('.facts .role').textContent()).to.equal('coach');
    expect(squash(await page.locator('.facts').textContent())).to.contain(`E-mail${email}`);
    expect(squash(await page.locator('header .account-link').textContent())).to.equal('account_circle Tamsin Orchardley · coach');
    // Accepting signed the coach in once: the page keeps the session the acceptance opened.
    const newUser = await running.created.context.models.User.findOne({ where: { email } });
    expect(await running.created.context.models.Session.count({ where: { userId: newUser?.id ?? -1 } })).to.equal(1);

    await page.getByRole('button', { name: 'Sign out' }).click();
    await page.waitForURL(`${running.baseUrl}/`);
    await page.goto(`${running.baseUrl}${linkPath}`);
    await page.getByLabel('Name shown to others').fill('Someone Else');
    await page.getByLabel('Password').fill('another long password');
    await page.getByRole('button', { name: 'Create my account' }).click();
    const gone = page.getByRole('alert');
    await gone.waitFor();
    expect(squash(await gone.textContent())).to.contain('This invitation cannot be used any more');
    // The first acceptance stands: its password still signs in, the second one does not.
    const kept = await page.request.post(`${running.baseUrl}/api/v1/sessions`, { data: { email, password: 'a coach sized password' } });
    expect(kept.status()).to.equal(201);
  });

  it('the reset page has no serious or critical axe violations and fits 360 px, with and without errors', async () => {
    context = await running.newContext({ serviceWorkers: 'block', viewport: { width: 360, height: 740 } });
    const page = await context.newPage();
    await page.goto(`${running.baseUrl}/account/reset-password/svl_not-a-real-token`);
    await page.getByRole('heading', { name: 'Choose a new password' }).waitFor();
    expect(await seriousViolations(page)).to.deep.equal([]);
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).to.be.at.most(360);

    // Keyboard only: Tab from the first field reaches the second, Enter submits.
    await page.getByLabel('New password', { exact: true }).focus();
    await page.keyboard.type('a long unknown password');
    await page.keyboard.press('Tab');
    expect(await page.evaluate(() => document.activeElement?.getAttribute('formcontrolname'))).to.equal('confirmation');
    await page.keyboard.type('not the same at all');
    await page.keyboard.press('Enter');
    await page.getByText('The two passwords are not the same.').waitFor();
    expect(await seriousViolations(page)).to.deep.equal([]);

    await page.getByLabel('New password again').fill('a long unknown password');
    await page.keyboard.press('Enter');
    await page.getByRole('alert').filter({ hasText: 'cannot be used any more' }).waitFor();
    expect(await seriousViolations(page)).to.deep.equal([]);
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).to.be.at.most(360);
  });
});
