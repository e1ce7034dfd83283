/**
 * The sift as a student uses it in the field: a 390 × 844 touch phone and a laptop. A pick never moves
 * the page or the focus, jumps land with the trait on screen, lengths convert and are checked, and an
 * answer the rest disagrees with is named.
 */
import fs from 'node:fs';
import path from 'node:path';
import { expect } from 'chai';
import type { BrowserContextOptions, Page } from 'playwright-core';
import { browserSuite } from './support/harness';
import { SCREENSHOT_DIR } from './support/server';
import { expectNoSidewaysOverflow, seriousViolations } from './support/checks';
import { openPart, seenSoFar, waitForLeader, waitForSift } from './support/sift-page';

const PHONE: BrowserContextOptions = { viewport: { width: 390, height: 844 }, hasTouch: true, isMobile: true, deviceScaleFactor: 2, serviceWorkers: 'block' };
const LAPTOP: BrowserContextOptions = { viewport: { width: 1280, height: 800 }, serviceWorkers: 'block' };

/**
 * Ten answers a red maple shows. Harlow and Harrar, Textbook of Dendrology, and USDA Agriculture
 * Handbook 654 (Silvics of North America), Acer rubrum: leaves opposite, simple, palmately 3–5-lobed,
 * lobes pointed, margins serrate (doubly so), palmately veined, pale or whitened beneath, on round
 * petioles; fruit paired samaras; young bark smooth light gray (from memory).
 */
const RED_MAPLE: ReadonlyArray<{ part: string; trait: string; answer: string }> = [
  { part: 'Leaf', trait: 'leaf-arrangement', answer: 'opposite' },
  { part: 'Leaf', trait: 'foliage', answer: 'broad' },
  { part: 'Leaf', trait: 'leaf-type', answer: 'simple' },
  { part: 'Leaf', trait: 'leaf-lobing', answer: 'palmately-lobed' },
  { part: 'Leaf', trait: 'leaf-margin', answer: 'serrate' },
  { part: 'Leaf', trait: 'lobe-tips', answer: 'pointed' },
  { part: 'Leaf', trait: 'venation', answer: 'palmate' },
  { part: 'Leaf', trait: 'leaf-surface', answer: 'whitened-below' },
  { part: 'Leaf', trait: 'petiole-form', answer: 'round' },
  { part: 'Fruit', trait: 'fruit-type', answer: 'paired-samara' },
];

describe('e2e: the sift in the field (phone and laptop)', function () {
  this.timeout(120_000);
  const running = browserSuite();

  async function open(options: BrowserContextOptions, query = ''): Promise<{ page: Page; errors: string[] }> {
    const page = await running.newPage(options);
    const errors: string[] = [];
    page.on('pageerror', (error) => errors.push(error.message));
    await page.goto(`${running.baseUrl}/sift${query}`);
    await waitForSift(page);
    return { page, errors };
  }

  /** How far the page has scrolled, once it has stopped moving. */
  async function settledScroll(page: Page): Promise<number> {
    let last = -1;
    for (let i = 0; i < 20; i++) {
      const now = await page.evaluate(
        () => new Promise<number>((resolve) => requestAnimationFrame(() => requestAnimationFrame(() => resolve(window.scrollY)))),
      );
      if (now === last) return now;
      last = now;
    }
    return last;
  }

  async function chipTop(page: Page, trait: string, answer: string | number): Promise<number> {
    return page.locator(`#chip-${trait}-${answer}`).evaluate((chip) => chip.getBoundingClientRect().top);
  }

  async function chipOnScreen(page: Page, trait: string, answer: string | number): Promise<boolean> {
    return page.locator(`#chip-${trait}-${answer}`).evaluate((chip) => {
      const box = chip.getBoundingClientRect();
      return box.top >= 0 && box.bottom <= window.innerHeight;
    });
  }

  it('takes the ten-tap red maple sift on a phone without the page or the focus moving', async () => {
    const { page, errors } = await open(PHONE, '?season=leaf-on&leeway=2');
    fs.mkdirSync(SCREENSHOT_DIR, { recursive: true });
    let manualScrolls = 0;
    let taps = 0;
    const scrollShifts: number[] = [];
    const openParts = new Set<string>();
    for (const [index, pick] of RED_MAPLE.entries()) {
      if (!openParts.has(pick.part)) {
        await openPart(page, pick.part);
        taps++;
        openParts.add(pick.part);
      }
      const chip = page.locator(`#chip-${pick.trait}-${pick.answer} [role="option"]`);
      if (!(await chipOnScreen(page, pick.trait, pick.answer))) {
        // What a person does: scroll until the chip is in view (counted; the goal is none beyond the list itself).
        await chip.scrollIntoViewIfNeeded();
        manualScrolls++;
      }
      const before = { scrollY: await settledScroll(page), chipTop: await chipTop(page, pick.trait, pick.answer) };
      await chip.tap();
      taps++;
      await page.locator(`sv-seen-so-far mat-chip[data-trait="${pick.trait}"]`).waitFor();
      const after = { scrollY: await settledScroll(page), chipTop: await chipTop(page, pick.trait, pick.answer) };
      // The chip stays under the finger. Seen so far and the notes above the chips change height
      // (a row of Seen so far added, a note shown or gone), so the browser's scroll anchoring moves
      // scrollY by that much either way; a jump to the top would be the whole page (about 1,300 px).
      expect(Math.abs(after.chipTop - before.chipTop), `the ${pick.answer} chip moved on screen`).to.be.at.most(1);
      expect(Math.abs(after.scrollY - before.scrollY), `the page jumped on picking ${pick.trait}: ${pick.answer}`).to.be.at.most(80);
      scrollShifts.push(Math.round(after.scrollY - before.scrollY));
      const focused = await page.evaluate(() => document.activeElement?.closest('mat-chip-option')?.id ?? document.activeElement?.tagName ?? null);
      expect(focused, `focus left the ${pick.answer} chip`).to.equal(`chip-${pick.trait}-${pick.answer}`);
      expect(await chipOnScreen(page, pick.trait, pick.answer), `${pick.answer} chip went off screen`).to.equal(true);
      if (index < 5) await page.screenshot({ path: path.join(SCREENSHOT_DIR, `sift-field-phone-pick-${index + 1}.png`) });
    }
    // The effect of each pick is on screen without scrolling: the sticky line names the leader.
    const standing = page.locator('.standing');
    expect(await standing.isVisible()).to.equal(true);
    const box = await standing.boundingBox();
    expect(box && box.y + box.height <= 844 + 1, 'the sticky summary sits inside the screen').to.equal(true);
    expect(await standing.textContent()).to.match(/Red maple \d+ % · \d+ in the shortlist/);
    // ...and a screen reader hears it.
    expect(await page.locator('sv-sift-page .announcement[aria-live="polite"]').textContent()).to.match(/^Shortlist: \d+ species; Red maple leads with \d+ %$/);
    await waitForLeader(page, 'acer-rubrum');
    console.log(
      `      red maple sift on a phone: ${taps} taps (${RED_MAPLE.length} chips, ${openParts.size} part panels), ${manualScrolls} manual scrolls to reach a chip; scrollY after each pick moved by ${scrollShifts.join(', ')} px (scroll anchoring as Seen so far grows), chip moved 0 px`,
    );
    await expectNoSidewaysOverflow(page, 'the phone sift');
    expect(await seriousViolations(page)).to.deep.equal([]);
    expect(errors, errors.join('\n')).to.deep.equal([]);
  });

  it('keeps the place on a laptop too, and after Enter in a number field', async () => {
    const { page } = await open(LAPTOP, '?season=leaf-on&leeway=2');
    await openPart(page, 'Leaf');
    const chip = page.locator('#chip-leaf-margin-serrate [role="option"]');
    await chip.scrollIntoViewIfNeeded();
    await page.mouse.wheel(0, 200);
    const before = { scrollY: await settledScroll(page), chipTop: await chipTop(page, 'leaf-margin', 'serrate') };
    expect(before.scrollY).to.be.greaterThan(0);
    await chip.click();
    await page.locator('sv-seen-so-far mat-chip[data-trait="leaf-margin"]').waitFor();
    // scroll anchoring keeps the chip in place as content above it changes height, either way
    expect(Math.abs((await settledScroll(page)) - before.scrollY)).to.be.at.most(80);
    expect(Math.abs((await chipTop(page, 'leaf-margin', 'serrate')) - before.chipTop)).to.be.at.most(1);
    expect(await page.evaluate(() => document.activeElement?.closest('mat-chip-option')?.id)).to.equal('chip-leaf-margin-serrate');

    const input = page.locator('#trait-leaf-length input[type="number"]');
    await input.scrollIntoViewIfNeeded();
    const inputTop = () => input.evaluate((element) => element.getBoundingClientRect().top);
    const beforeEnter = { scrollY: await settledScroll(page), top: await inputTop() };
    await input.fill('8');
    await input.press('Enter');
    await page.locator('sv-seen-so-far mat-chip[data-trait="leaf-length"]').waitFor();
    expect((await settledScroll(page)) - beforeEnter.scrollY).to.be.within(0, 80);
    expect(Math.abs((await inputTop()) - beforeEnter.top)).to.be.at.most(1);
    expect(await page.evaluate(() => (document.activeElement as HTMLInputElement | null)?.name)).to.equal('leaf-length');
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'sift-field-laptop.png') });
  });

  it('jumps to a Look at next trait in a closed part and to a searched value with the trait fully on screen', async () => {
    for (const options of [PHONE, LAPTOP]) {
      const { page } = await open(options, '?o=leaf-lobing:palmately-lobed&season=leaf-on&leeway=2');
      const what = options === PHONE ? 'phone' : 'laptop';
      // Close every part first, as a student who folded them away.
      for (const header of await page.locator('sv-trait-picker mat-expansion-panel-header[aria-expanded="true"]').all()) await header.click();
      const suggestion = page.locator('sv-look-at-next .suggestions > li button').first();
      const trait = await suggestion.getAttribute('data-trait');
      await suggestion.click();
      const section = page.locator(`#trait-${trait}`);
      await section.waitFor({ state: 'visible' });
      // The jump ends by focusing the trait once its part has opened and it is centred: wait for that, then for the scroll to rest.
      await page.waitForFunction((id) => document.getElementById(id)?.contains(document.activeElement) ?? false, `trait-${trait}`);
      await settledScroll(page);
      const inView = await section.evaluate((element) => {
        const box = element.getBoundingClientRect();
        return { top: box.top, bottom: box.bottom, height: window.innerHeight };
      });
      expect(inView.top, `${what}: ${trait} starts above the screen`).to.be.at.least(0);
      expect(inView.bottom, `${what}: ${trait} ends below the screen`).to.be.at.most(inView.height);
      expect(await page.evaluate(() => document.activeElement?.closest('section.trait')?.id)).to.equal(`trait-${trait}`);

      // Search and choose a value: it is added to Seen so far and its chip is on screen, focused and selected.
      const search = page.getByRole('combobox', { name: 'Find a trait or value' });
      await search.fill('opposite');
      await page.getByRole('option', { name: /^Leaf and bud arrangement: Opposite$/ }).click();
      await page.locator('sv-seen-so-far mat-chip[data-trait="leaf-arrangement"]').waitFor();
      expect(await seenSoFar(page)).to.include('Leaf and bud arrangement: Opposite');
      await page.waitForFunction(() => document.activeElement?.closest('#chip-leaf-arrangement-opposite') !== null);
      await settledScroll(page);
      expect(await chipOnScreen(page, 'leaf-arrangement', 'opposite'), `${what}: the chosen chip is off screen`).to.equal(true);
      expect(await page.locator('#chip-leaf-arrangement-opposite [role="option"]').getAttribute('aria-selected')).to.equal('true');
    }
  });

  it('shows focus as a ring and choice as a fill, never one for the other', async () => {
    const { page } = await open(LAPTOP, '?season=leaf-on&leeway=2');
    const search = page.getByRole('combobox', { name: 'Find a trait or value' });
    await search.fill('three needles');
    await page.locator('mat-option').first().waitFor();
    await search.press('ArrowDown');
    await search.press('Enter');
    await page.waitForFunction(() => document.activeElement?.closest('#chip-needles-per-fascicle-3') !== null);
    expect(await page.locator('#chip-needles-per-fascicle-3 [role="option"]').getAttribute('aria-selected')).to.equal('true');
    // Move focus to a chip that is not chosen: it shows a ring, and its fill stays that of an unchosen chip.
    await page.keyboard.press('ArrowRight');
    await page.waitForFunction(() => document.activeElement?.closest('#chip-needles-per-fascicle-4') !== null);
    const look = (id: string) =>
      page.locator(`#${id}`).evaluate((chip) => {
        const style = getComputedStyle(chip);
        const overlay = chip.querySelector('.mat-mdc-chip-focus-overlay');
        return { background: style.backgroundColor, outline: style.outlineStyle, overlay: overlay ? getComputedStyle(overlay).opacity : '0' };
      });
    const focused = await look('chip-needles-per-fascicle-4');
    const plain = await look('chip-needles-per-fascicle-5');
    const chosen = await look('chip-needles-per-fascicle-3');
    expect(focused.outline).to.not.equal('none');
    expect(plain.outline).to.equal('none');
    expect(focused.background).to.equal(plain.background);
    expect(focused.overlay).to.equal('0');
    expect(chosen.background).to.not.equal(plain.background);
    await page.locator('#trait-needles-per-fascicle').screenshot({ path: path.join(SCREENSHOT_DIR, 'sift-field-focus-vs-chosen.png') });
  });

  it('converts a typed length when the unit changes, notes lengths beyond every species and refuses impossible ones', async () => {
    const { page } = await open(LAPTOP, '?season=leaf-on&leeway=2');
    await openPart(page, 'Leaf');
    const section = page.locator('#trait-leaf-length');
    const input = section.locator('input[type="number"]');
    await input.fill('8');
    // NIST SP 811 (2008), Appendix B: 1 in = 2.54 cm exactly, so 8 cm = 3.1496 in, shown as 3.1 in.
    await section.locator('mat-button-toggle', { hasText: /^in$/ }).locator('button').click();
    await page.waitForFunction(() => (document.querySelector('#trait-leaf-length input') as HTMLInputElement | null)?.value === '3.1');
    const leafLength = page.locator('sv-seen-so-far mat-chip[data-trait="leaf-length"]');
    expect(await leafLength.textContent()).to.match(/: 3\.1 in\b/);
    expect(await section.locator('.field-message.span').textContent()).to.match(/^Most species here: [\d.]+–[\d.]+ in$/);

    // 900 cm is longer than any leaf coded here: a gentle note, and it still counts.
    await section.locator('mat-button-toggle', { hasText: /^cm$/ }).locator('button').click();
    await input.fill('900');
    await input.press('Enter');
    await section.locator('.field-message.note').waitFor();
    expect(await section.locator('.field-message.note').textContent()).to.match(/Larger than any species here \(max \d+ cm\)/);
    expect(await leafLength.textContent()).to.match(/: 900 cm\b/);

    // −5 cannot be a length: an inline message, and nothing is counted.
    await input.fill('-5');
    await input.press('Enter');
    const problem = section.locator('.field-message.problem');
    await problem.waitFor();
    expect(await problem.textContent()).to.match(/more than 0/);
    expect(await input.getAttribute('aria-invalid')).to.equal('true');
    await leafLength.waitFor({ state: 'detached' });

    // Every numeric trait shows its usual span.
    await openPart(page, 'Fruit');
    expect(await page.locator('#trait-fruit-length .field-message.span').textContent()).to.match(/^Most species here: [\d.]+–[\d.]+ cm$/);
  });

  it('asks to check again the one answer a red maple sift disagrees with', async () => {
    const kept = ['foliage', 'leaf-type', 'leaf-lobing', 'leaf-margin', 'lobe-tips', 'venation', 'fruit-type'];
    const observed = RED_MAPLE.filter((pick) => kept.includes(pick.trait));
    const o = [...observed.map((pick) => `${pick.trait}:${pick.answer}`), 'leaf-arrangement:alternate'].join(';');
    const { page } = await open(LAPTOP, `?o=${o}&season=leaf-on&leeway=2`);
    const check = page.locator('.check-again');
    await check.waitFor();
    expect(await check.getAttribute('data-trait')).to.equal('leaf-arrangement');
    expect(await check.textContent()).to.match(/Check again:.*Leaf and bud arrangement: Alternate/);
    await check.getByRole('button', { name: 'See the ranking without it' }).click();
    expect(await check.locator('.without').textContent()).to.match(/^Without it: Red maple \d+ %/);
    await check.getByRole('button', { name: 'Remove it' }).click();
    await page.waitForFunction(() => !new URL(location.href).search.includes('leaf-arrangement'));
    await waitForLeader(page, 'acer-rubrum');
    expect(await page.locator('.check-again').count()).to.equal(0);
  });

  it('offers the last tree instead of restoring it, and says where Side by side appeared', async () => {
    const context = await running.newContext(PHONE);
    const page = await context.newPage();
    await page.goto(`${running.baseUrl}/sift?o=leaf-arrangement:opposite;leaf-lobing:palmately-lobed&season=leaf-on&leeway=2`);
    await waitForSift(page);
    await page.goto(`${running.baseUrl}/sift`);
    await waitForSift(page);
    expect(await seenSoFar(page)).to.deep.equal([]);
    await page.getByRole('button', { name: 'Start a new one' }).click();
    expect(await page.getByRole('button', { name: 'Continue the last tree' }).count()).to.equal(0);
    await page.reload();
    await waitForSift(page);
    expect(await page.getByRole('button', { name: 'Continue the last tree' }).count(), 'a new tree forgets the old offer').to.equal(0);

    await page.goto(`${running.baseUrl}/sift?o=leaf-arrangement:opposite;leaf-lobing:palmately-lobed&season=leaf-on&leeway=2`);
    await waitForSift(page);
    await page.goto(`${running.baseUrl}/sift`);
    await page.getByRole('button', { name: 'Continue the last tree' }).click();
    expect(await seenSoFar(page)).to.deep.equal(['Leaf and bud arrangement: Opposite', 'Lobing: Palmately lobed']);

    // Two ticks fill Side by side far below: a message says so and takes you there.
    for (const id of ['acer-rubrum', 'acer-saccharinum']) await page.locator(`sv-shortlist .candidate[data-taxon="${id}"] mat-checkbox input`).check();
    await page.getByText(/Side by side is ready below the shortlist/).waitFor();
    await page.getByRole('button', { name: 'Show it' }).click();
    await page.waitForFunction(() => {
      const box = document.querySelector('#side-heading')?.getBoundingClientRect();
      return box !== undefined && box.top >= 0 && box.bottom <= window.innerHeight;
    });
  });

  it('reads well: plural counts, weights in words, one caution, the info icon whole', async () => {
    const { page } = await open(LAPTOP, '?season=leaf-on&leeway=2');
    const counts = await page.locator('sv-trait-picker .part-count').allTextContents();
    for (const count of counts) expect(count.trim()).to.match(/^(1 trait|([02-9]|\d{2,}) traits)$/);
    const summary = (await page.locator('sv-shortlist .summary').textContent())?.replace(/\s+/g, ' ').trim() ?? '';
    const total = Number(/All (\d+) species/.exec(summary)?.[1]);
    expect(summary).to.match(/the first 10 shown/);
    expect((await page.locator('sv-shortlist .show-all').textContent())?.trim()).to.equal(`Show the top 25 of ${total}`);

    const { page: sifted } = await open(LAPTOP, '?o=leaf-arrangement:opposite;leaf-lobing:palmately-lobed&season=leaf-on&leeway=2');
    const leader = sifted.locator('sv-shortlist .candidates > .candidate').first();
    await leader.locator('.why mat-expansion-panel-header').click();
    const weights = await leader.locator('.likelihood').allTextContents();
    expect(weights.length).to.be.greaterThan(0);
    for (const weight of weights) expect(weight).to.not.match(/\d/);
    const icon = await sifted.locator('.caution mat-icon').boundingBox();
    expect(icon?.width).to.be.at.least(24);
    const cautionText = 'A ranked shortlist is a suggestion, not a determination.';
    const shown = await sifted.evaluate(
      (text) => [...document.querySelectorAll('p')].filter((p) => p.textContent?.includes(text) && p.checkVisibility()).length,
      cautionText,
    );
    expect(shown, 'the identification caution shows once on the sift page').to.equal(1);
  });

  it('keeps the footer below the first screen while the edition downloads, so nothing is pushed down', async () => {
    const page = await running.newPage(PHONE);
    let release: () => void = () => undefined;
    const held = new Promise<void>((resolve) => (release = resolve));
    await page.route('**/api/v1/editions/current/bundle', async (route) => {
      await held;
      await route.continue();
    });
    await page.goto(`${running.baseUrl}/sift`);
    await page.getByText('Downloading the current edition').waitFor();
    const footerTop = () => page.locator('sv-site-footer').evaluate((footer) => footer.getBoundingClientRect().top);
    expect(await footerTop(), 'the footer shows on the loading screen').to.be.at.least(844);
    release();
    await waitForSift(page);
    expect(await footerTop()).to.be.at.least(844);
  });

  it('takes screenshots on a phone and a laptop, light and dark', async () => {
    fs.mkdirSync(SCREENSHOT_DIR, { recursive: true });
    for (const colorScheme of ['light', 'dark'] as const) {
      for (const [name, options] of [
        ['phone', PHONE],
        ['laptop', LAPTOP],
      ] as const) {
        const page = await running.newPage({ ...options, colorScheme });
        await page.goto(
          `${running.baseUrl}/sift?o=leaf-arrangement:opposite;leaf-lobing:palmately-lobed;leaf-margin:serrate;fruit-type:paired-samara&season=leaf-on&leeway=2`,
        );
        await waitForSift(page);
        await page.locator('#trait-leaf-margin').scrollIntoViewIfNeeded();
        await page.screenshot({ path: path.join(SCREENSHOT_DIR, `sift-field-${name}-${colorScheme}.png`) });
        expect(await seriousViolations(page), `${name} ${colorScheme}`).to.deep.equal([]);
      }
    }
  });
});
