import fs from 'node:fs';
import path from 'node:path';
import { expect } from 'chai';
import type { APIRequestContext, BrowserContext, Page } from 'playwright-core';
import { demoAccount, expectNoSidewaysOverflow, seriousViolations, signInThroughPage as signIn } from './support/checks';
import { browserSuite } from './support/harness';
import { DEMO_PASSWORD } from '../../api/src/db/seeders/0002-demo-scenario';

/** Screens of this suite, at phone and desktop widths, for a person to look at after a run. */
const SHOTS = '/tmp/sylvasift-review';

const PHONE = { width: 360, height: 780 };
const DESKTOP = { width: 1280, height: 900 };

interface QueryBody {
  id: number;
  taxonId: string;
  traitCode: string;
  state: string;
  outcome: string | null;
  answer: string | null;
  evidence: string | null;
  history: Array<{ action: string }>;
}

/** A dialog is shot as the screen shows it; pages whole. */
async function shoot(page: Page, name: string, fullPage = true): Promise<void> {
  fs.mkdirSync(SHOTS, { recursive: true });
  await page.screenshot({ path: path.join(SHOTS, `${name}.png`), fullPage });
}

/** A bearer token for a demo account, for checking through the API what the screens did. */
async function tokenFor(request: APIRequestContext, baseUrl: string, role: string): Promise<string> {
  const session = await request.post(`${baseUrl}/api/v1/sessions`, { data: { email: demoAccount(role).email, password: DEMO_PASSWORD } });
  expect(session.status()).to.equal(201);
  return ((await session.json()) as { token: string }).token;
}

describe('e2e: Second look and raising a query', function () {
  this.timeout(180_000);
  const running = browserSuite();
  let context: BrowserContext;
  /** the query the learner raises in the first test, answered in the second */
  let raisedId = 0;
  /** the words the species page shows for that cell */
  let raisedWords = '';

  it('a visitor is offered sign-in; a learner flags a value from a species page and follows the query', async () => {
    context = await running.newContext({ serviceWorkers: 'block', viewport: PHONE });
    const page = await context.newPage();
    const pageErrors: string[] = [];
    page.on('pageerror', (error) => pageErrors.push(error.message));

    await page.goto(`${running.baseUrl}/species/pinus-echinata`);
    const row = page.locator('.traits .row[data-trait="needles-per-fascicle"]');
    await row.waitFor();
    expect(await page.getByRole('button', { name: /^Query / }).count(), 'no query buttons for visitors').to.equal(0);
    const signInLink = page.locator('.query-hint').getByRole('link', { name: 'Sign in' });
    expect(await signInLink.getAttribute('href')).to.equal('/sign-in?next=%2Fspecies%2Fpinus-echinata');

    await signIn(page, running.baseUrl, 'learner', '/species/pinus-echinata');
    await row.waitFor();
    raisedWords = ((await row.locator('.words').textContent()) ?? '').trim();
    expect(raisedWords).to.not.equal('');
    // Reviewers' links stay out of a learner's navigation.
    expect(await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Second look' }).count()).to.equal(0);
    await expectNoSidewaysOverflow(page, 'the species page with query buttons');
    await shoot(page, 'species-learner-phone');

    await row.getByRole('button', { name: /^Query Needles per/ }).click();
    const dialog = page.getByRole('dialog', { name: 'Query this value?' });
    await dialog.waitFor();
    expect(await dialog.textContent()).to.contain(raisedWords);
    // The note is required: an empty one is refused in the form.
    await dialog.getByRole('button', { name: 'Raise query' }).click();
    expect(await dialog.locator('mat-error').textContent()).to.contain('Say what you saw');
    expect(await seriousViolations(page)).to.deep.equal([]);
    await expectNoSidewaysOverflow(page, 'the query dialog');
    await shoot(page, 'flag-dialog-phone', false);

    await dialog.getByLabel('What did you see?').fill('Saw bundles of four on a young tree by the creek, on two branches.');
    await dialog.getByRole('button', { name: 'Raise query' }).click();
    const confirmation = page.getByRole('dialog', { name: /^Query \d+ is open$/ });
    await confirmation.waitFor();
    await shoot(page, 'flag-confirmed-phone', false);
    const link = confirmation.getByRole('link', { name: /^Open query \d+$/ });
    raisedId = Number(/\d+$/.exec((await link.textContent())?.trim() ?? '')?.[0]);
    expect(raisedId).to.be.greaterThan(0);
    await link.click();
    await page.waitForURL(new RegExp(`/review/${raisedId}$`));
    await page.locator('h1', { hasText: 'Shortleaf pine' }).waitFor();
    expect(await page.locator('.state-badge').textContent()).to.contain('Open');
    expect(await page.locator('[data-cell="edition"]').textContent()).to.equal(raisedWords);
    expect(await page.locator('.note').textContent()).to.contain('bundles of four');
    // A learner reads the query but is offered none of the reviewer's actions.
    expect(await page.getByRole('button', { name: 'Save answer' }).count()).to.equal(0);
    expect(await page.getByRole('button', { name: 'Recode…' }).count()).to.equal(0);
    await expectNoSidewaysOverflow(page, 'the query page for its raiser');

    // The learner's list holds their own queries only: not the one another student raised.
    await page.locator('.crumbs').getByRole('link', { name: 'Your queries' }).click();
    await page.locator('h1', { hasText: 'Your queries' }).waitFor();
    await page.locator('.query-card').first().waitFor();
    const listed = await page.locator('.query-card').evaluateAll((cards) => cards.map((card) => card.textContent ?? ''));
    expect(listed.some((text) => text.includes('Shortleaf pine') && text.includes('Open'))).to.equal(true);
    expect(listed.some((text) => text.includes('Northern red oak') || text.includes('Bark'))).to.equal(false);
    expect(await seriousViolations(page)).to.deep.equal([]);
    await expectNoSidewaysOverflow(page, 'the learner’s queries');
    await shoot(page, 'your-queries-phone');

    // Another student's query does not open for a learner; the page says so and offers their own list.
    const reviewerToken = await tokenFor(page.request, running.baseUrl, 'reviewer');
    const all = (await (
      await page.request.get(`${running.baseUrl}/api/v1/queries?taxonId=quercus-rubra`, { headers: { Authorization: `Bearer ${reviewerToken}` } })
    ).json()) as {
      queries: QueryBody[];
    };
    const othersId = all.queries[0]?.id;
    expect(othersId, 'the demo seeds a query by another student').to.be.a('number');
    await page.goto(`${running.baseUrl}/review/${othersId}`);
    const refused = page.getByRole('alert').filter({ hasText: 'could not be opened' });
    await refused.waitFor();
    expect(await refused.textContent()).to.contain(`There is no query ${othersId} you can see`);
    expect(await refused.getByRole('link', { name: 'See the queries you can open' }).count()).to.equal(1);
    await expectNoSidewaysOverflow(page, 'a query that cannot be opened');
    await shoot(page, 'query-not-yours-phone');
    expect(pageErrors, pageErrors.join('\n')).to.deep.equal([]);
  });

  it('the reviewer finds the query in Second look, answers it with evidence and settles it, keeping the cell', async () => {
    expect(raisedId, 'the first test raised a query').to.be.greaterThan(0);
    context = await running.newContext({ serviceWorkers: 'block', viewport: DESKTOP });
    const page = await context.newPage();
    const pageErrors: string[] = [];
    page.on('pageerror', (error) => pageErrors.push(error.message));

    await page.goto(`${running.baseUrl}/review`);
    await page.waitForURL(/\/sign-in\?next=%2Freview$/);
    await signIn(page, running.baseUrl, 'reviewer', '/review');
    await page.locator('h1', { hasText: 'Second look' }).waitFor();
    expect(await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Second look' }).count()).to.equal(1);

    // Open queries, oldest first: the two the demo seeds, then the learner's.
    const card = page.locator(`.query-card[data-query="${raisedId}"]`);
    await card.waitFor();
    const ids = await page.locator('.query-card').evaluateAll((cards) => cards.map((c) => Number(c.getAttribute('data-query'))));
    expect(ids).to.have.length.at.least(3);
    expect(ids).to.deep.equal([...ids].sort((a, b) => a - b));
    expect(ids.at(-1)).to.equal(raisedId);
    expect(await page.locator('.query-card').evaluateAll((cards) => cards.every((c) => c.getAttribute('data-state') === 'open'))).to.equal(true);
    const cardText = (await card.textContent()) ?? '';
    expect(cardText).to.contain('Shortleaf pine');
    expect(cardText).to.contain('Pinus echinata');
    expect(cardText).to.contain('Needles per');
    expect(cardText).to.contain(`Coded now: ${raisedWords}`);
    expect(cardText).to.contain('bundles of four');
    expect(cardText).to.contain(`by ${demoAccount('learner').displayName}`);
    expect(await seriousViolations(page)).to.deep.equal([]);
    await shoot(page, 'queue-desktop');

    // Nothing is answered yet: the filter says so, and the state is kept in the URL.
    await page.getByRole('radio', { name: 'Answered' }).click();
    await page.waitForURL(/\/review\?state=answered$/);
    await page.locator('.empty h2', { hasText: 'No answered queries.' }).waitFor();
    expect(await page.locator('.query-card').count()).to.equal(0);
    await shoot(page, 'queue-empty-desktop');
    await page.getByRole('radio', { name: 'Open' }).click();
    await card.waitFor();

    await card.getByRole('link').click();
    await page.waitForURL(new RegExp(`/review/${raisedId}$`));
    const answerButton = page.getByRole('button', { name: 'Save answer' });
    await answerButton.waitFor();
    // The answer is required: nothing is sent without it.
    await answerButton.click();
    expect(await page.locator('mat-error').first().textContent()).to.contain('Write the answer');
    expect(await seriousViolations(page)).to.deep.equal([]);
    await shoot(page, 'query-open-desktop');

    await page
      .getByRole('textbox', { name: 'Answer', exact: true })
      .fill('Fours are not recorded for this species; bundles of two and three are usual. Check for a second species nearby.');
    await page.getByRole('textbox', { name: 'Evidence' }).fill('Demo answer: herbarium sheets of the club collection.');
    await answerButton.click();
    await page.locator('.state-badge', { hasText: 'Answered' }).waitFor();
    expect(await page.locator('.history li[data-action="answered"]').count()).to.equal(1);
    // The saved answer leaves an empty form behind, not an error.
    expect(await page.getByRole('textbox', { name: 'Answer', exact: true }).inputValue()).to.equal('');
    expect(await page.locator('mat-error').count()).to.equal(0);

    // Settling asks first; going back leaves the query answered.
    await page.getByRole('button', { name: 'Settle…' }).click();
    const ask = page.getByRole('dialog', { name: 'Settle this query?' });
    await ask.waitFor();
    expect(await ask.textContent()).to.contain(raisedWords);
    expect(await seriousViolations(page)).to.deep.equal([]);
    await shoot(page, 'settle-dialog-desktop', false);
    await ask.getByRole('button', { name: 'Go back' }).click();
    await ask.waitFor({ state: 'detached' });
    expect(await page.locator('.state-badge').textContent()).to.contain('Answered');

    await page.getByLabel('Note (optional)').fill('Kept: the coding matches the flora.');
    await page.getByRole('button', { name: 'Settle…' }).click();
    await ask.getByRole('button', { name: 'Settle, keep the cell' }).click();
    await page.locator('.state-badge', { hasText: 'Settled' }).waitFor();
    expect(await page.locator('.outcome').textContent()).to.contain('kept as it is');

    const token = await tokenFor(page.request, running.baseUrl, 'reviewer');
    const query = (await (
      await page.request.get(`${running.baseUrl}/api/v1/queries/${raisedId}`, { headers: { Authorization: `Bearer ${token}` } })
    ).json()) as QueryBody;
    expect(query).to.include({ state: 'settled', outcome: 'kept' });
    expect(query.answer).to.match(/^Fours are not recorded/);
    expect(query.evidence).to.equal('Demo answer: herbarium sheets of the club collection.');
    expect(query.history.map((event) => event.action)).to.deep.equal(['raised', 'answered', 'settled']);

    // Signed in, anyone sees a Query action beside each coded value.
    await page.goto(`${running.baseUrl}/species/pinus-echinata`);
    await page.locator('.traits .row').first().waitFor();
    expect(await page.getByRole('button', { name: /^Query / }).count()).to.equal(await page.locator('.traits .row').count());
    await shoot(page, 'species-reviewer-desktop');
    expect(pageErrors, pageErrors.join('\n')).to.deep.equal([]);
  });

  it('in the dark, an admin recoding a numeric range reads the cell version, and an out-of-order range is refused before anything is sent', async () => {
    context = await running.newContext({ serviceWorkers: 'block', viewport: PHONE, colorScheme: 'dark' });
    const page = await context.newPage();
    const learnerToken = await tokenFor(page.request, running.baseUrl, 'learner');
    const raised = await page.request.post(`${running.baseUrl}/api/v1/queries`, {
      headers: { Authorization: `Bearer ${learnerToken}` },
      data: { taxonId: 'pinus-taeda', traitCode: 'needle-length', note: 'Demo query: measured longer needles than coded.' },
    });
    expect(raised.status()).to.equal(201);
    const { id } = (await raised.json()) as QueryBody;

    const curatorToken = await tokenFor(page.request, running.baseUrl, 'curator');
    const cell = (await (
      await page.request.get(`${running.baseUrl}/api/v1/curation/cells/pinus-taeda/needle-length`, { headers: { Authorization: `Bearer ${curatorToken}` } })
    ).json()) as {
      version: number;
    };

    // The link the reviewers' e-mail carries opens the same query page.
    await signIn(page, running.baseUrl, 'admin', '/review');
    await page.goto(`${running.baseUrl}/review/queries/${id}`);
    await page.waitForURL(new RegExp(`/review/${id}$`));
    const low = page.getByLabel('Typical from');
    await low.waitFor();
    // An admin may read the working matrix, so the recode is based on the version read.
    await page.locator('.hint', { hasText: `based on version ${cell.version} of the cell` }).waitFor();
    expect(await seriousViolations(page)).to.deep.equal([]);
    // The editor starts from the published range; the seeded loblolly needle length is 10 (15–23) 23 cm.
    expect(await low.inputValue()).to.equal('15');
    await low.fill('30');
    await page.getByLabel('Reason').fill('Demo: typed out of order on purpose.');
    await page.getByRole('button', { name: 'Recode…' }).click();
    // the refusal shows on the page's next render: wait for it, then check there is exactly one
    const refusal = page.getByRole('alert').filter({ hasText: 'The range must read' });
    await refusal.first().waitFor();
    expect(await refusal.count()).to.equal(1);
    expect(await page.getByRole('dialog').count()).to.equal(0);
    await expectNoSidewaysOverflow(page, 'the numeric recode editor');
    await shoot(page, 'recode-numeric-dark-phone');

    const reviewerToken = await tokenFor(page.request, running.baseUrl, 'reviewer');
    const still = (await (
      await page.request.get(`${running.baseUrl}/api/v1/queries/${id}`, { headers: { Authorization: `Bearer ${reviewerToken}` } })
    ).json()) as QueryBody;
    expect(still.state).to.equal('open');
  });

  it('the reviewer recodes a seeded query; a stale recode shows the cell as it is now and keeps the change', async () => {
    context = await running.newContext({ serviceWorkers: 'block', viewport: PHONE });
    const page = await context.newPage();
    const pageErrors: string[] = [];
    page.on('pageerror', (error) => pageErrors.push(error.message));
    const base = running.baseUrl;
    const reviewerToken = await tokenFor(page.request, base, 'reviewer');
    const curatorToken = await tokenFor(page.request, base, 'curator');
    const asCurator = { Authorization: `Bearer ${curatorToken}` };
    const cellUrl = `${base}/api/v1/curation/cells/quercus-rubra/bark-texture`;

    const open = (await (
      await page.request.get(`${base}/api/v1/queries?state=open&taxonId=quercus-rubra&traitCode=bark-texture`, {
        headers: { Authorization: `Bearer ${reviewerToken}` },
      })
    ).json()) as {
      queries: QueryBody[];
    };
    expect(open.queries, 'the demo seeds an open query on red oak bark').to.have.length(1);
    const queryId = open.queries[0].id;

    await signIn(page, base, 'reviewer', '/review');
    await page.locator(`.query-card[data-query="${queryId}"]`).waitFor();
    await expectNoSidewaysOverflow(page, 'the Second look queue');
    expect(await seriousViolations(page)).to.deep.equal([]);
    await shoot(page, 'queue-phone');
    await page.locator(`.query-card[data-query="${queryId}"]`).getByRole('link').click();
    await page.waitForURL(new RegExp(`/review/${queryId}$`));
    // The reviewer reads the working cell's version, so a recode names it from the start.
    const read = (await (await page.request.get(cellUrl, { headers: asCurator })).json()) as { version: number };
    await page.locator('.hint', { hasText: `based on version ${read.version} of the cell` }).waitFor();

    // The reviewer's change (demo values, not a claim about red oak bark): smooth becomes usual beside furrowed.
    const smooth = page.getByRole('combobox', { name: 'Smooth', exact: true });
    await smooth.waitFor();
    expect(await smooth.textContent()).to.contain('Occasional');
    await smooth.click();
    await page.getByRole('option', { name: 'Usual' }).click();
    await page.getByLabel('Reason').fill('Demo: the smooth stripes between the ridges are usual on older trunks.');
    await expectNoSidewaysOverflow(page, 'the recode editor');
    await shoot(page, 'recode-editor-phone');

    // Meanwhile a curator changes the same cell at the Matrix desk.
    const before = (await (await page.request.get(cellUrl, { headers: asCurator })).json()) as { version: number };
    const curatorValue = { usual: ['furrowed'], occasional: ['smooth'], rare: ['plated'] };
    const put = await page.request.put(cellUrl, {
      headers: asCurator,
      data: { value: curatorValue, version: before.version, reason: 'Demo: a curator edit meanwhile.' },
    });
    expect(put.status()).to.equal(200);
    const curatorVersion = ((await put.json()) as { version: number }).version;

    await page.getByRole('button', { name: 'Recode…' }).click();
    const ask = page.getByRole('dialog', { name: 'Recode this cell?' });
    await ask.waitFor();
    expect(await ask.textContent()).to.contain('Smooth, deeply furrowed');
    expect(await seriousViolations(page)).to.deep.equal([]);
    await shoot(page, 'recode-dialog-phone', false);
    await ask.getByRole('button', { name: 'Recode and settle' }).click();

    // Refused: nothing written, the curator's value and version shown, the reviewer's change kept.
    const stale = page.locator('[data-stale]');
    await stale.waitFor();
    expect(await stale.locator('[data-cell="current"]').textContent()).to.equal('Deeply furrowed; occasionally smooth; rarely plated');
    expect(await stale.textContent()).to.contain(`version ${curatorVersion}`);
    expect(await smooth.textContent()).to.contain('Usual');
    expect(await page.getByLabel('Reason').inputValue()).to.contain('smooth stripes');
    expect(((await (await page.request.get(cellUrl, { headers: asCurator })).json()) as { value: unknown }).value).to.deep.equal(curatorValue);
    expect(await seriousViolations(page)).to.deep.equal([]);
    await expectNoSidewaysOverflow(page, 'the stale recode');
    await shoot(page, 'recode-stale-phone');
    await stale.scrollIntoViewIfNeeded();
    await shoot(page, 'recode-stale-view-phone', false);

    await stale.getByRole('button', { name: `Base my change on version ${curatorVersion}` }).click();
    await stale.waitFor({ state: 'detached' });
    expect(await smooth.textContent()).to.contain('Usual');
    await page.getByRole('button', { name: 'Recode…' }).click();
    await ask.getByRole('button', { name: 'Recode and settle' }).click();
    await page.locator('.state-badge', { hasText: 'Settled' }).waitFor();
    expect(await page.locator('.outcome').textContent()).to.contain('recoded');
    await shoot(page, 'recoded-phone');

    const cell = (await (await page.request.get(cellUrl, { headers: asCurator })).json()) as { value: unknown; version: number };
    expect(cell.value).to.deep.equal({ usual: ['smooth', 'furrowed'] });
    expect(cell.version).to.equal(curatorVersion + 1);
    const query = (await (
      await page.request.get(`${base}/api/v1/queries/${queryId}`, { headers: { Authorization: `Bearer ${reviewerToken}` } })
    ).json()) as QueryBody;
    expect(query).to.include({ state: 'settled', outcome: 'recoded' });
    expect(pageErrors, pageErrors.join('\n')).to.deep.equal([]);
  });
});
