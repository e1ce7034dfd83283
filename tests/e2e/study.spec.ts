import fs from 'node:fs';
import path from 'node:path';
import { expect } from 'chai';
import type { BrowserContext, Page } from 'playwright-core';
import { demoAccount, expectNoSidewaysOverflow, seriousViolations, signInThroughPage as signIn } from './support/checks';
import { browserSuite } from './support/harness';
import { DEMO_PASSWORD } from '../../api/src/db/seeders/0002-demo-scenario';
import { DEMO_STUDY_SET } from '../../api/src/db/seeders/0003-demo-study-set';

/** Screens of this suite, at phone and desktop widths, for a person to look at after a run. */
const SHOTS = '/tmp/sylvasift-study';

const PHONE = { width: 360, height: 780 };
const DESKTOP = { width: 1280, height: 900 };

async function shoot(page: Page, name: string): Promise<void> {
  fs.mkdirSync(SHOTS, { recursive: true });
  await page.screenshot({ path: path.join(SHOTS, `${name}.png`), fullPage: true });
}

async function addSpecies(page: Page, typed: string, option: RegExp): Promise<void> {
  const search = page.getByLabel('Add a species by name');
  await search.fill(typed);
  await page.getByRole('option', { name: option }).first().click();
  // the field is cleared on the page's next change detection: wait for it, then check
  await page
    .waitForFunction((input) => (input as HTMLInputElement | null)?.value === '', await search.elementHandle(), { timeout: 3_000 })
    .catch(() => undefined);
  expect(await search.inputValue()).to.equal('');
}

async function orderedSpecies(page: Page): Promise<string[]> {
  return page.locator('.species-order .species-item').evaluateAll((items) => items.map((item) => item.getAttribute('data-species') ?? ''));
}

/** Waits (briefly) for the editor's list to show this order, then checks it. */
async function expectOrder(page: Page, expected: string[]): Promise<void> {
  await page
    .waitForFunction(
      (ids) => [...document.querySelectorAll('.species-order .species-item')].map((item) => item.getAttribute('data-species')).join() === ids.join(),
      expected,
      { timeout: 3_000 },
    )
    .catch(() => undefined);
  expect(await orderedSpecies(page)).to.deep.equal(expected);
}

/** The question on screen: its clue text and its choices' names in order. */
async function questionOnScreen(page: Page): Promise<{ clues: string; choices: string[] }> {
  const question = page.locator('.question');
  await question.waitFor();
  // A question is read only once the last one's feedback has gone.
  await page.locator('[data-feedback]').waitFor({ state: 'detached' });
  const clues = ((await question.locator('.clues').textContent()) ?? '').replace(/\s+/g, ' ').trim();
  const choices = await question.locator('.choice').evaluateAll((buttons) => buttons.map((button) => button.getAttribute('data-species') ?? ''));
  return { clues, choices };
}

/** Reads the answer the feedback names ("Right: X" or "It is X"), as a species id via the choices' names. */
async function revealedAnswer(page: Page): Promise<string> {
  await page.locator('[data-feedback]').waitFor();
  const right = page.locator('.choice.right');
  expect(await right.count()).to.equal(1);
  return (await right.getAttribute('data-species')) ?? '';
}

describe('e2e: study sets and drills', function () {
  this.timeout(120_000);
  const running = browserSuite();
  let context: BrowserContext;

  it('a coach makes a set of three species, drills it with a fixed seed, and deletes it after confirming', async () => {
    context = await running.newContext({ serviceWorkers: 'block', viewport: DESKTOP });
    const page = await context.newPage();
    const pageErrors: string[] = [];
    page.on('pageerror', (error) => pageErrors.push(error.message));

    // The study pages are for signed-in people only.
    await page.goto(`${running.baseUrl}/study`);
    await page.waitForURL(/\/sign-in\?next=%2Fstudy$/);
    await signIn(page, running.baseUrl, 'coach', '/study');

    // The coach's seeded set is listed; the new one is not there yet.
    const demoCard = page.locator('.set-card', { hasText: DEMO_STUDY_SET.name });
    await demoCard.waitFor();
    expect(await demoCard.locator('.species-line').textContent()).to.contain(`${DEMO_STUDY_SET.taxa.length} species`);
    expect(await demoCard.locator('.badge').textContent()).to.contain('Shared');
    expect(await seriousViolations(page)).to.deep.equal([]);
    await shoot(page, 'list-desktop');

    await page.getByRole('link', { name: 'New study set' }).click();
    await page.waitForURL(/\/study\/new$/);
    await page.getByLabel('Name', { exact: true }).fill('   ');
    await page.getByLabel('Event or class').fill('Bramblewood Valley practice round');
    await page.getByLabel('Event date').fill('2027-03-20');
    await page.getByLabel('Notes for students').fill('Three to start with: a pine, an oak, a maple.');
    await page.getByRole('switch', { name: /Shared/ }).click();

    // Saving with no species is refused in the form, before anything is sent.
    await page.getByRole('button', { name: 'Save study set' }).click();
    expect(await page.getByRole('alert').textContent()).to.contain('Add at least one species');

    await addSpecies(page, 'loblolly', /Loblolly pine/);
    await addSpecies(page, 'white oak', /White oak/);
    // Typos are tolerated by the server's fuzzy search.
    await addSpecies(page, 'red mapel', /Red maple/);
    await expectOrder(page, ['pinus-taeda', 'quercus-alba', 'acer-rubrum']);
    // A species already in the list is offered but cannot be added twice.
    await page.getByLabel('Add a species by name').fill('white oak');
    const listed = page.getByRole('option', { name: /White oak/ }).first();
    await listed.waitFor();
    expect(await listed.getAttribute('aria-disabled')).to.equal('true');
    await page.keyboard.press('Escape');
    await page.getByLabel('Add a species by name').fill('');

    // Reordering from the keyboard: the moved species keeps focus, so it can be moved again.
    await page.getByRole('button', { name: 'Move Red maple up' }).click();
    await expectOrder(page, ['pinus-taeda', 'acer-rubrum', 'quercus-alba']);
    expect(await page.evaluate(() => document.activeElement?.getAttribute('aria-label'))).to.equal('Move Red maple up');
    await page.keyboard.press('Enter');
    await expectOrder(page, ['acer-rubrum', 'pinus-taeda', 'quercus-alba']);
    await page.getByRole('button', { name: 'Move Red maple down' }).click();
    await expectOrder(page, ['pinus-taeda', 'acer-rubrum', 'quercus-alba']);
    await shoot(page, 'editor-desktop');

    // A blank name passes the form but the server refuses it: its reason is shown and nothing typed is lost.
    await page.getByRole('button', { name: 'Save study set' }).click();
    const refused = page.locator('.problem[role="alert"]');
    await refused.waitFor();
    expect(await refused.textContent()).to.match(/not saved.*name/i);
    // The reason is the server's, shown on the field it names (the form's own check says "Give the set a name.").
    const nameReason = (await page.locator('mat-error').first().textContent())?.trim() ?? '';
    expect(nameReason).to.not.equal('Give the set a name.');
    expect(await refused.textContent()).to.contain(nameReason);
    expect(await page.getByLabel('Event or class').inputValue()).to.equal('Bramblewood Valley practice round');
    expect(await page.getByLabel('Notes for students').inputValue()).to.equal('Three to start with: a pine, an oak, a maple.');
    await expectOrder(page, ['pinus-taeda', 'acer-rubrum', 'quercus-alba']);
    expect(page.url()).to.match(/\/study\/new$/);

    await page.getByLabel('Name', { exact: true }).fill('Practice round: three to start');
    await page.getByRole('button', { name: 'Save study set' }).click();
    await page.waitForURL(/\/study\/\d+$/);
    const setId = Number(new URL(page.url()).pathname.split('/').pop());
    await page.locator('h1', { hasText: 'Practice round: three to start' }).waitFor();
    const links = page.locator('.species-links li a');
    expect(await links.count()).to.equal(3);
    expect(await links.evaluateAll((anchors) => anchors.map((anchor) => anchor.getAttribute('href')))).to.deep.equal([
      '/species/pinus-taeda',
      '/species/acer-rubrum',
      '/species/quercus-alba',
    ]);
    expect(await page.locator('.share-line code').textContent()).to.equal(`${running.baseUrl}/study/${setId}`);
    expect(await page.locator('.event').textContent()).to.contain('March 20, 2027');
    await shoot(page, 'set-desktop');

    // Listed, newest change first.
    await signIn(page, running.baseUrl, 'coach', '/study');
    const card = page.locator(`.set-card[data-set="${setId}"]`);
    await card.waitFor();
    expect(await page.locator('.set-card').first().getAttribute('data-set')).to.equal(String(setId));
    expect(await card.locator('.species-line').textContent()).to.match(/3 species:\s*Loblolly pine, Red maple, White oak/);

    // The study sheet: each species' separating traits within the set, and a key that reaches all three.
    await signIn(page, running.baseUrl, 'coach', `/study/${setId}/sheet`);
    await page.locator('.sheet-card').first().waitFor();
    expect(await page.locator('.sheet-card').count()).to.equal(3);
    for (const id of ['pinus-taeda', 'acer-rubrum', 'quercus-alba']) {
      expect(await page.locator(`.sheet-card[data-species="${id}"] li`).count(), id).to.be.greaterThan(0);
    }
    expect(await page.locator('.small-print').first().textContent()).to.match(/greedily/);
    const reached = await page.locator('.key .lead-to strong').allTextContents();
    expect([...reached].sort()).to.include.members(['Loblolly pine', 'Red maple', 'White oak']);
    // Printing leaves the app's top bar and the screen-only buttons off the paper.
    await page.emulateMedia({ media: 'print' });
    expect(await page.locator('sv-top-bar').isVisible()).to.equal(false);
    expect(await page.getByRole('button', { name: 'Print' }).isVisible()).to.equal(false);
    expect(await page.locator('.sheet-cautions').isVisible()).to.equal(true);
    await shoot(page, 'sheet-print');
    await page.emulateMedia({ media: 'screen' });
    await shoot(page, 'sheet-desktop');

    // The drill, with a fixed seed: the same seed asks the same questions with the same choices.
    const drillPath = `/study/${setId}/drill?seed=20270320`;
    await signIn(page, running.baseUrl, 'coach', drillPath);
    const firstLook = await questionOnScreen(page);
    expect(firstLook.choices).to.have.length(3);
    expect([...firstLook.choices].sort()).to.deep.equal(['acer-rubrum', 'pinus-taeda', 'quercus-alba']);
    expect(firstLook.clues).to.not.equal('');
    await page.keyboard.press('1');
    const firstAnswer = await revealedAnswer(page);
    await page.keyboard.press('Enter');
    const secondLook = await questionOnScreen(page);
    await page.keyboard.press('1');
    const secondAnswer = await revealedAnswer(page);
    expect(secondAnswer).to.not.equal(firstAnswer);

    await signIn(page, running.baseUrl, 'coach', drillPath);
    expect(await questionOnScreen(page)).to.deep.equal(firstLook);
    expect(await page.locator('[data-score]').textContent()).to.equal('Score: 0 of 0');
    expect(await seriousViolations(page)).to.deep.equal([]);
    await shoot(page, 'drill-question-desktop');

    // Right, by its number key.
    await page.keyboard.press(String(firstLook.choices.indexOf(firstAnswer) + 1));
    const feedback = page.locator('[data-feedback]');
    await feedback.waitFor();
    expect(await feedback.locator('.verdict').textContent()).to.match(/^\s*check_circle\s*Right: /);
    expect(await feedback.locator('.why li').count()).to.be.greaterThan(0);
    expect(await page.locator('[data-score]').textContent()).to.equal('Score: 1 of 1');
    expect(await page.locator('.caution').textContent()).to.match(/not advice on eating or using/);
    await page.keyboard.press('Enter');

    // Wrong: the feedback names the right species and how the pick differs from it.
    expect(await questionOnScreen(page)).to.deep.equal(secondLook);
    const wrongIndex = secondLook.choices.findIndex((id) => id !== secondAnswer);
    await page.keyboard.press(String(wrongIndex + 1));
    await feedback.waitFor();
    const verdict = (await feedback.locator('.verdict').textContent()) ?? '';
    expect(verdict).to.match(/Not quite\. It is /);
    expect(await page.locator('.choice.right').getAttribute('data-species')).to.equal(secondAnswer);
    expect(await page.locator('.choice.wrong').getAttribute('data-species')).to.equal(secondLook.choices[wrongIndex]);
    expect(await feedback.locator('.differences li').count()).to.be.greaterThan(0);
    expect(await page.locator('[data-score]').textContent()).to.equal('Score: 1 of 2');
    expect(await seriousViolations(page)).to.deep.equal([]);
    await shoot(page, 'drill-feedback-desktop');
    await page.keyboard.press('Enter');

    // The last species, typed with a typo, is read as the right one.
    const thirdLook = await questionOnScreen(page);
    const thirdAnswer = ['pinus-taeda', 'acer-rubrum', 'quercus-alba'].find((id) => id !== firstAnswer && id !== secondAnswer);
    const typedNames: Record<string, string> = { 'pinus-taeda': 'lobloly pine', 'acer-rubrum': 'red mapel', 'quercus-alba': 'whte oak' };
    expect(thirdLook.choices).to.include(thirdAnswer);
    await page.getByLabel('Or type its name').fill('no such tree at all');
    await page.getByLabel('Or type its name').press('Enter');
    expect(await page.locator('.typed + .problem').textContent()).to.contain('No species of this set matches');
    expect(await page.locator('[data-score]').textContent()).to.equal('Score: 1 of 2');
    await page.getByLabel('Or type its name').fill(typedNames[thirdAnswer ?? '']);
    await page.getByLabel('Or type its name').press('Enter');
    await feedback.waitFor();
    expect(await feedback.locator('.verdict').textContent()).to.contain('Right: ');
    await page.getByRole('button', { name: 'See your score' }).click();

    const summary = page.locator('.summary');
    await summary.waitFor();
    expect(await summary.locator('h2').textContent()).to.equal('You named 2 of 3');
    expect(await summary.locator('.missed li').count()).to.equal(1);
    await shoot(page, 'drill-summary-desktop');
    await page.getByRole('button', { name: 'Practise the ones you missed (1)' }).click();
    // the page renders the new round on its next change detection: wait for it, then read it
    await page.locator('.round-kind', { hasText: 'Practising the ones you missed' }).waitFor();
    expect(await page.locator('.round-kind').textContent()).to.contain('missed');
    expect(await page.locator('.score-line').textContent()).to.contain('Question 1 of 1');
    const practice = await questionOnScreen(page);
    expect(practice.clues).to.equal(secondLook.clues);
    await page.keyboard.press(String(practice.choices.indexOf(secondAnswer) + 1));
    await feedback.waitFor();
    expect(await page.locator('[data-score]').textContent()).to.equal('Score: 1 of 1');

    // Delete: cancelling keeps the set; confirming removes it here and on the server.
    await signIn(page, running.baseUrl, 'coach', '/study');
    await card.waitFor();
    await card.getByRole('button', { name: /^Delete / }).click();
    const dialog = page.getByRole('dialog');
    await dialog.waitFor();
    expect(await dialog.textContent()).to.contain('Practice round: three to start');
    await dialog.getByRole('button', { name: 'Keep it' }).click();
    await dialog.waitFor({ state: 'detached' });
    expect(await card.count()).to.equal(1);
    await card.getByRole('button', { name: /^Delete / }).click();
    await dialog.getByRole('button', { name: 'Delete study set' }).click();
    await card.waitFor({ state: 'detached' });
    const token = await page.evaluate(() => localStorage.getItem('sylvasift.session'));
    const gone = await page.request.get(`${running.baseUrl}/api/v1/study-sets/${setId}`, { headers: { Authorization: `Bearer ${token}` } });
    expect(gone.status()).to.equal(404);
    expect(await demoCard.count()).to.equal(1);
    expect(pageErrors, pageErrors.join('\n')).to.deep.equal([]);
  });

  it('a learner is told what study sets are for, and opens and drills a shared set from its link', async () => {
    context = await running.newContext({ serviceWorkers: 'block', viewport: PHONE });
    const page = await context.newPage();
    await signIn(page, running.baseUrl, 'learner', '/study');
    const explain = page.locator('.explain');
    await explain.waitFor();
    expect(await explain.textContent()).to.match(/coach shares one by sending you its link/);
    expect(await page.getByRole('link', { name: 'New study set' }).count()).to.equal(0);
    expect(await seriousViolations(page)).to.deep.equal([]);
    await expectNoSidewaysOverflow(page, 'the learner study page');
    await shoot(page, 'list-learner-phone');

    const token = await page.evaluate(() => localStorage.getItem('sylvasift.session'));
    // A learner cannot list sets; the shared demo set is found through the coach, as its link would be.
    const coach = demoAccount('coach');
    const session = await page.request.post(`${running.baseUrl}/api/v1/sessions`, { data: { email: coach.email, password: DEMO_PASSWORD } });
    const coachToken = ((await session.json()) as { token: string }).token;
    const sets = (await (await page.request.get(`${running.baseUrl}/api/v1/study-sets`, { headers: { Authorization: `Bearer ${coachToken}` } })).json()) as {
      studySets: Array<{ id: number; name: string }>;
    };
    const demo = sets.studySets.find((set) => set.name === DEMO_STUDY_SET.name);
    expect(demo).to.not.equal(undefined);
    const listedForLearner = await page.request.get(`${running.baseUrl}/api/v1/study-sets`, { headers: { Authorization: `Bearer ${token}` } });
    expect(listedForLearner.status()).to.equal(403);

    await signIn(page, running.baseUrl, 'learner', `/study/${demo?.id}`);
    await page.locator('h1', { hasText: DEMO_STUDY_SET.name }).waitFor();
    expect(await page.locator('.species-links li').count()).to.equal(DEMO_STUDY_SET.taxa.length);
    // Only the owner (or an admin) is offered editing and the share box.
    expect(await page.getByRole('link', { name: 'Edit' }).count()).to.equal(0);
    expect(await page.locator('.share').count()).to.equal(0);
    await expectNoSidewaysOverflow(page, 'the study set page');
    await shoot(page, 'set-phone');

    await page.getByRole('link', { name: 'Print study sheet' }).click();
    await page.locator('.sheet-card').first().waitFor();
    expect(await page.locator('.sheet-card').count()).to.equal(DEMO_STUDY_SET.taxa.length);
    expect(await page.locator('.key .couplet').count()).to.be.at.least(DEMO_STUDY_SET.taxa.length - 1);
    await expectNoSidewaysOverflow(page, 'the study sheet');
    await shoot(page, 'sheet-phone');

    await signIn(page, running.baseUrl, 'learner', `/study/${demo?.id}/drill?seed=5`);
    const look = await questionOnScreen(page);
    expect(look.choices).to.have.length(4);
    expect(new Set(look.choices).size).to.equal(4);
    await expectNoSidewaysOverflow(page, 'a drill question');
    expect(await seriousViolations(page)).to.deep.equal([]);
    await shoot(page, 'drill-question-phone');
    await page.locator('.choice').nth(2).click();
    await page.locator('[data-feedback]').waitFor();
    expect(await page.locator('[data-score]').textContent()).to.match(/^Score: [01] of 1$/);
    await expectNoSidewaysOverflow(page, 'drill feedback');
    await shoot(page, 'drill-feedback-phone');
  });

  it('the coach screens fit a 360 px phone', async () => {
    context = await running.newContext({ serviceWorkers: 'block', viewport: PHONE });
    const page = await context.newPage();
    await signIn(page, running.baseUrl, 'coach', '/study');
    const demoCard = page.locator('.set-card', { hasText: DEMO_STUDY_SET.name });
    await demoCard.waitFor();
    await expectNoSidewaysOverflow(page, 'the study set list');
    await shoot(page, 'list-phone');

    await demoCard.getByRole('link', { name: 'Edit' }).click();
    await page.waitForURL(/\/study\/\d+\/edit$/);
    await page.locator('.species-order .species-item').first().waitFor();
    expect(await page.getByLabel('Name', { exact: true }).inputValue()).to.equal(DEMO_STUDY_SET.name);
    expect(await page.locator('.species-order .species-item').count()).to.equal(DEMO_STUDY_SET.taxa.length);
    await expectNoSidewaysOverflow(page, 'the study set editor');
    expect(await seriousViolations(page)).to.deep.equal([]);
    await shoot(page, 'editor-phone');
  });

  it('asks before leaving the editor with unsaved changes, and keeps them when the coach stays', async () => {
    context = await running.newContext({ serviceWorkers: 'block', viewport: DESKTOP });
    const page = await context.newPage();
    const pageErrors: string[] = [];
    page.on('pageerror', (error) => pageErrors.push(error.message));
    await signIn(page, running.baseUrl, 'coach', '/study');
    const demoCard = page.locator('.set-card', { hasText: DEMO_STUDY_SET.name });
    const openEditor = async () => {
      await demoCard.getByRole('link', { name: 'Edit' }).click();
      await page.waitForURL(/\/study\/\d+\/edit$/);
      await page.locator('.species-order .species-item').first().waitFor();
    };
    const backToList = () => page.locator('.crumbs').getByRole('link', { name: 'Study sets' }).click();
    const question = page.getByRole('dialog', { name: 'Leave without saving?' });
    const notes = page.getByLabel('Notes for students');

    // Nothing changed: leaving asks nothing.
    await openEditor();
    const savedNotes = await notes.inputValue();
    await backToList();
    await page.waitForURL(/\/study$/);
    expect(await question.count()).to.equal(0);

    // A change, then leaving: the question comes; staying keeps what was typed.
    await openEditor();
    await notes.fill('Bring a hand lens for the buds.');
    await backToList();
    await question.waitFor();
    expect(await question.textContent()).to.contain('Your changes to this study set have not been saved');
    expect(await seriousViolations(page)).to.deep.equal([]);
    await shoot(page, 'leave-question-desktop');
    await question.getByRole('button', { name: 'Keep editing' }).click();
    await question.waitFor({ state: 'detached' });
    expect(page.url()).to.match(/\/study\/\d+\/edit$/);
    expect(await notes.inputValue()).to.equal('Bring a hand lens for the buds.');

    // Escape also keeps editing.
    await backToList();
    await question.waitFor();
    await page.keyboard.press('Escape');
    await question.waitFor({ state: 'detached' });
    expect(page.url()).to.match(/\/study\/\d+\/edit$/);

    // Reloading the tab with the change: the browser's own question comes first.
    let asked = '';
    page.once('dialog', (dialog) => {
      asked = dialog.type();
      void dialog.accept();
    });
    await page.reload();
    expect(asked).to.equal('beforeunload');
    await page.locator('.species-order .species-item').first().waitFor();
    expect(await notes.inputValue()).to.equal(savedNotes);

    // Leaving on purpose: the change is dropped and the set is as it was.
    await notes.fill('A note that will not be kept.');
    await backToList();
    await question.getByRole('button', { name: 'Leave without saving' }).click();
    await page.waitForURL(/\/study$/);
    await openEditor();
    expect(await notes.inputValue()).to.equal(savedNotes);
    expect(pageErrors, pageErrors.join('\n')).to.deep.equal([]);
  });
});
