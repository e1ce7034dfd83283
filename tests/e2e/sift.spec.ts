import fs from 'node:fs';
import path from 'node:path';
import { expect } from 'chai';
import type { Page } from 'playwright-core';
import { browserSuite } from './support/harness';
import { SCREENSHOT_DIR } from './support/server';
import { measure, openPart, seenSoFar, shortlistIds, tapChip, waitForLeader, waitForSift } from './support/sift-page';

describe('e2e: sifting a tree', function () {
  this.timeout(90_000);
  const running = browserSuite();

  async function freshSiftPage(query = ''): Promise<{ page: Page; errors: string[] }> {
    const context = await running.newContext({ viewport: { width: 1280, height: 900 }, serviceWorkers: 'block' });
    const page = await context.newPage();
    const errors: string[] = [];
    page.on('pageerror', (error) => errors.push(error.message));
    page.on('console', (message) => {
      if (message.type() === 'error') errors.push(message.text());
    });
    await page.goto(`${running.baseUrl}/sift${query}`);
    await waitForSift(page);
    return { page, errors };
  }

  it('sifts a pine by needles per bundle, needle length in inches and cone length, explains the rank, undoes a chip and shares the sift', async () => {
    const { page, errors } = await freshSiftPage();
    await openPart(page, 'Needle');
    await openPart(page, 'Cone');

    // Flora of North America vol. 2, Pinus taeda: needles 3 per fascicle, (10–)12–18(–23) cm;
    // cones 6–12(–15) cm. Pinus serotina: needles 3 (4) per fascicle, 15–20 cm, cones 5–8 cm (from memory).
    await tapChip(page, 'needles-per-fascicle', 3);
    await measure(page, 'needle-length', 6, 'in');
    await page.locator('sv-seen-so-far mat-chip[data-trait="needle-length"]').waitFor();
    const beforeCone = await shortlistIds(page);
    // 6 in of needle (15.2 cm, NIST SP 811: 1 in = 2.54 cm exactly) fits both loblolly and pond pine.
    expect(beforeCone.slice(0, 3)).to.include.members(['pinus-taeda', 'pinus-serotina']);

    await measure(page, 'cone-length', 10, 'cm');
    // A 10 cm cone is inside loblolly's range and longer than any pond pine cone.
    await waitForLeader(page, 'pinus-taeda');
    const withCone = await shortlistIds(page);
    expect(withCone.indexOf('pinus-serotina')).to.be.greaterThan(0);
    expect(withCone).to.not.deep.equal(beforeCone);

    expect(await seenSoFar(page)).to.deep.equal(['Needles per bundle (fascicle): 3 per bundle', 'Needle length: 6 in', 'Seed cone length: 10 cm']);
    expect(new URL(page.url()).search).to.contain('o=needles-per-fascicle:3;needle-length:6in;cone-length:10cm');

    // Why this rank: every observed trait of the leader matches, in the engine's words.
    const leader = page.locator('sv-shortlist .candidates > .candidate').first();
    expect(await leader.locator('.conflicts').textContent()).to.match(/0 conflicts/);
    await leader.locator('.why mat-expansion-panel-header').click();
    const matched = leader.locator('.reasons li[data-status="matched"]');
    await matched.first().waitFor();
    expect(await matched.count()).to.equal(3);
    expect((await leader.locator('.reason-group').first().textContent())?.trim()).to.equal('Matched (3)');

    // Removing the cone chip gives the shortlist it had before.
    await page.locator('sv-seen-so-far mat-chip[data-trait="cone-length"] button[matChipRemove]').click();
    await page.waitForFunction(() => !new URL(location.href).search.includes('cone-length'));
    expect(await shortlistIds(page)).to.deep.equal(beforeCone);

    // The back button steps back to the sift with the cone.
    await page.goBack();
    await waitForLeader(page, 'pinus-taeda');
    expect(await shortlistIds(page)).to.deep.equal(withCone);
    const shared = page.url();

    // A fresh browser with the shared link shows the same sift.
    const { page: other } = await freshSiftPage(new URL(shared).search);
    expect(await seenSoFar(other)).to.deep.equal(['Needles per bundle (fascicle): 3 per bundle', 'Needle length: 6 in', 'Seed cone length: 10 cm']);
    expect(await shortlistIds(other)).to.deep.equal(withCone);
    await other.context().close();

    // The last sift comes back after a reload of the bare /sift address, once asked for.
    await page.goto(`${running.baseUrl}/sift`);
    await page.getByRole('button', { name: 'Continue the last tree' }).click();
    await waitForLeader(page, 'pinus-taeda');
    expect(new URL(page.url()).search).to.contain('cone-length:10cm');

    expect(errors, errors.join('\n')).to.deep.equal([]);
    await page.context().close();
  });

  it('sifts a leafless sycamore from bark and buds only, hiding what winter cannot show', async () => {
    const { page } = await freshSiftPage('?season=leaf-off');
    // Harlow and Harrar, Textbook of Dendrology, Platanus occidentalis: bark mottled, flaking off in
    // patches; lateral buds covered by a single cap-like scale; no true terminal bud (from memory).
    expect(await page.locator('#trait-leaf-shape').count()).to.equal(0);
    await openPart(page, 'Bark');
    await tapChip(page, 'bark-texture', 'mottled-flaking');
    await openPart(page, 'Twig and bud');
    await tapChip(page, 'bud-scales', 'single-cap');
    await tapChip(page, 'terminal-bud', 'absent');
    await waitForLeader(page, 'platanus-occidentalis');
    expect(new URL(page.url()).searchParams.get('season')).to.equal('leaf-off');
    // The leaf-on traits stay hidden while the season is leafless.
    await openPart(page, 'Leaf');
    expect(await page.locator('#trait-leaf-shape').count()).to.equal(0);
    expect(await page.locator('#trait-leaf-arrangement').count()).to.equal(1);
    await page.context().close();
  });

  it('keeps the true species on the shortlist when one chip is wrong', async () => {
    // Loblolly pine as above, plus smooth bark, which Flora of North America vol. 2 does not give for
    // Pinus taeda (bark reddish brown, in irregular scaly plates; from memory).
    const { page } = await freshSiftPage('?o=needles-per-fascicle:3;needle-length:6in;cone-length:10cm;bark-texture:smooth&season=leaf-on&leeway=2');
    const ids = await shortlistIds(page);
    expect(ids.slice(0, 3)).to.include('pinus-taeda');
    const taeda = page.locator('sv-shortlist .candidate[data-taxon="pinus-taeda"]');
    expect(await taeda.locator('.conflicts').textContent()).to.match(/1 conflict\b/);

    // With no leeway the one conflict moves it to Ruled out, with the bark named as the reason.
    await page.locator('sv-shortlist mat-button-toggle', { hasText: /^0$/ }).locator('button').click();
    await page.waitForFunction(() => new URL(location.href).searchParams.get('leeway') === '0');
    expect(await shortlistIds(page)).to.not.include('pinus-taeda');
    await page.locator('.ruled-out mat-expansion-panel-header').click();
    const ruledOut = page.locator('.ruled-out-list > li[data-taxon="pinus-taeda"]');
    await ruledOut.waitFor();
    expect(await ruledOut.textContent()).to.match(/bark/i);
    await page.context().close();
  });

  it('finds chips by words, suggests what to look at next and lays candidates side by side', async () => {
    const { page } = await freshSiftPage('?season=leaf-on&leeway=2');
    const search = page.getByRole('combobox', { name: 'Find a trait or value' });
    await search.fill('three needles');
    // Keyboard only: the best match comes first, arrow down and Enter pick it and jump to its chip,
    // where Space takes it back and picks it again.
    const first = page.locator('mat-option').first();
    await first.waitFor();
    expect((await first.textContent())?.trim()).to.equal('Needles per bundle (fascicle): 3 per bundle');
    await search.press('ArrowDown');
    await search.press('Enter');
    const chip = page.locator('#chip-needles-per-fascicle-3 [role="option"]');
    await chip.waitFor();
    await page.waitForFunction(() => document.activeElement?.closest('#chip-needles-per-fascicle-3') !== null);
    await page.locator('sv-seen-so-far mat-chip[data-trait="needles-per-fascicle"]').waitFor();
    await page.keyboard.press('Space');
    await page.locator('sv-seen-so-far mat-chip[data-trait="needles-per-fascicle"]').waitFor({ state: 'detached' });
    await page.keyboard.press('Space');
    await page.locator('sv-seen-so-far mat-chip[data-trait="needles-per-fascicle"]').waitFor();

    await search.fill('peeling bark');
    await page
      .getByRole('option', { name: /^Bark texture.*: Peeling/i })
      .first()
      .waitFor();

    // Look at next offers 3 to 5 traits, each with what its answers would leave.
    const suggestions = page.locator('sv-look-at-next .suggestions > li');
    const count = await suggestions.count();
    expect(count).to.be.within(3, 5);
    expect(await suggestions.first().locator('.previews li').count()).to.be.greaterThan(1);
    const trait = await suggestions.first().locator('button').getAttribute('data-trait');
    await suggestions.first().locator('button').click();
    await page.locator(`#trait-${trait}`).waitFor({ state: 'visible' });

    // Side by side. Flora of North America vol. 2 (from memory): Pinus rigida needles 7–14 cm, cones
    // 3–9 cm; P. taeda needles 10–23 cm, cones 6–15 cm — they differ, with overlap, on both.
    await page.locator('sv-shortlist .candidate[data-taxon="pinus-taeda"] mat-checkbox input').check();
    await page.locator('sv-shortlist .candidate[data-taxon="pinus-rigida"] mat-checkbox input').check();
    const rows = page.locator('sv-side-by-side tbody tr');
    await rows.first().waitFor();
    expect(await rows.count()).to.be.greaterThan(0);
    const verdicts = await rows.evaluateAll((items) => items.map((item) => item.getAttribute('data-verdict')));
    // Separators come first.
    const firstOther = verdicts.findIndex((verdict) => verdict !== 'separates');
    if (firstOther >= 0) expect(verdicts.slice(firstOther)).to.not.include('separates');
    expect(await page.locator('sv-side-by-side thead th').allTextContents()).to.include.members(['Loblolly pine', 'Pitch pine']);
    fs.mkdirSync(SCREENSHOT_DIR, { recursive: true });
    await page.locator('sv-side-by-side').screenshot({ path: path.join(SCREENSHOT_DIR, 'sift-side-by-side.png') });
    for (const code of ['needle-length', 'cone-length']) {
      expect(await page.locator(`sv-side-by-side tbody tr[data-trait="${code}"]`).getAttribute('data-verdict')).to.be.oneOf(['separates', 'overlaps']);
    }
    await page.context().close();
  });

  it('clears all observations with an undo', async () => {
    const { page } = await freshSiftPage('?o=needles-per-fascicle:5&season=leaf-on&leeway=2');
    // Flora of North America vol. 2: Pinus strobus is the only eastern pine with needles 5 per fascicle.
    await waitForLeader(page, 'pinus-strobus');
    await page.getByRole('button', { name: 'Clear all' }).click();
    expect(await seenSoFar(page)).to.deep.equal([]);
    await page.getByRole('button', { name: 'Undo' }).click();
    await page.locator('sv-seen-so-far mat-chip').first().waitFor();
    await waitForLeader(page, 'pinus-strobus');
    await page.context().close();
  });

  it('shows the loading, download-failed and no-match states', async () => {
    const context = await running.newContext({ viewport: { width: 1280, height: 900 }, serviceWorkers: 'block' });
    const page = await context.newPage();
    let failing = true;
    let release: () => void = () => undefined;
    const seenLoading = new Promise<void>((resolve) => (release = resolve));
    await page.route('**/api/v1/editions/current/bundle', async (route) => {
      if (!failing) return route.continue();
      // Hold the answer until the loading state has been seen, then fail as a down API would.
      await seenLoading;
      return route.fulfill({
        status: 503,
        contentType: 'application/problem+json',
        body: JSON.stringify({ type: 'about:blank', title: 'Service unavailable', status: 503, detail: 'The API is down for maintenance.' }),
      });
    });
    await page.goto(`${running.baseUrl}/sift?o=needles-per-fascicle:5;cone-length:30cm&season=leaf-on&leeway=0`);
    await page.getByText('Downloading the current edition').waitFor();
    release();
    const alert = page.getByRole('alert');
    await alert.waitFor();
    expect(await alert.textContent()).to.contain('The API is down for maintenance.');
    failing = false;
    await page.getByRole('button', { name: 'Try again' }).click();
    // Flora of North America vol. 2: Pinus strobus, the one five-needled pine here, has cones 8–20 cm
    // (from memory); a 30 cm cone fits no species without a conflict.
    await page.getByText('No species fits with a leeway of 0.').waitFor();
    expect(await page.locator('.ruled-out-title').textContent()).to.match(/Ruled out \(\d+\)/);
    await context.close();
  });

  it('renders at phone and desktop widths', async () => {
    fs.mkdirSync(SCREENSHOT_DIR, { recursive: true });
    for (const [name, viewport] of [
      ['sift-phone', { width: 360, height: 740 }],
      ['sift-desktop', { width: 1280, height: 900 }],
    ] as const) {
      const context = await running.newContext({ viewport, serviceWorkers: 'block' });
      const page = await context.newPage();
      await page.goto(`${running.baseUrl}/sift?o=needles-per-fascicle:3;needle-length:6in&season=leaf-on&leeway=2`);
      await waitForSift(page);
      // Nothing may overflow sideways at phone width (common practice, no source).
      const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
      expect(overflow, `${name} overflows by ${overflow}px`).to.be.at.most(0);
      await page.screenshot({ path: path.join(SCREENSHOT_DIR, `${name}.png`), fullPage: false });
      await page.locator('.results').screenshot({ path: path.join(SCREENSHOT_DIR, `${name}-results.png`) });
      await page.goto(`${running.baseUrl}/species/pinus-taeda`);
      await page.locator('h1', { hasText: 'Loblolly pine' }).waitFor();
      await page.screenshot({ path: path.join(SCREENSHOT_DIR, `${name.replace('sift', 'species')}.png`), fullPage: false });
      await context.close();
    }
  });
});
