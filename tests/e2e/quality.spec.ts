import fs from 'node:fs';
import path from 'node:path';
import zlib from 'node:zlib';
import { expect } from 'chai';
import { seriousViolations } from './support/checks';
import { browserSuite } from './support/harness';
import { SCREENSHOT_DIR, WEB_ROOT } from './support/server';
import { openPart, tapChip, waitForSift } from './support/sift-page';

/** Most gzip bytes of JavaScript the first page load may fetch (see where it is checked). */
const INITIAL_JS_GZIP_BUDGET = 200 * 1024;

function median(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  const middle = Math.floor(sorted.length / 2);
  return sorted.length % 2 === 1 ? sorted[middle] : (sorted[middle - 1] + sorted[middle]) / 2;
}

describe('e2e: accessibility and performance', function () {
  this.timeout(90_000);
  const running = browserSuite();

  it('the sift page has no serious or critical axe violations, with chips chosen and reasons open', async () => {
    const context = await running.newContext({ viewport: { width: 1280, height: 900 }, serviceWorkers: 'block' });
    const page = await context.newPage();
    await page.goto(`${running.baseUrl}/sift?o=needles-per-fascicle:3;needle-length:6in&season=leaf-on&leeway=2`);
    await waitForSift(page);
    await openPart(page, 'Bark');
    await page.locator('sv-trait-picker .help-toggle').first().click();
    await page.locator('sv-shortlist .why mat-expansion-panel-header').first().click();
    await page.locator('sv-shortlist .reasons li').first().waitFor();
    expect(await seriousViolations(page)).to.deep.equal([]);
    fs.mkdirSync(SCREENSHOT_DIR, { recursive: true });
    await page
      .locator('sv-trait-picker .trait')
      .first()
      .screenshot({ path: path.join(SCREENSHOT_DIR, 'sift-help-card.png') });

    // Full keyboard use: Tab reaches a chip, Space picks it, and focus is visible (common practice, no source).
    const chip = page.locator('#chip-bark-texture-plated [role="option"]');
    await chip.focus();
    await page.keyboard.press('Space');
    await page.locator('sv-seen-so-far mat-chip[data-trait="bark-texture"]').waitFor();
    expect(await chip.getAttribute('aria-selected')).to.equal('true');
    await context.close();
  });

  it('the species page has no serious or critical axe violations and shows its cautions', async () => {
    const context = await running.newContext({ viewport: { width: 390, height: 844 }, serviceWorkers: 'block' });
    const page = await context.newPage();
    await page.goto(`${running.baseUrl}/species/pinus-taeda`);
    await page.locator('h1', { hasText: 'Loblolly pine' }).waitFor();
    expect(await page.locator('.sci').first().textContent()).to.equal('Pinus taeda');
    // Flora of North America vol. 2, Pinus taeda: needles 3 per fascicle (from memory).
    expect(await page.locator('.traits .row[data-trait="needles-per-fascicle"] dd').textContent()).to.match(/3 per bundle/);
    expect(await page.locator('.cautions li').count()).to.be.greaterThan(1);
    // Flora of North America vol. 2: P. taeda has 3 needles per fascicle and prickly cone scales,
    // P. strobus 5 needles and unarmed cones (from memory), so some coded trait must tell them apart.
    expect(await page.locator('.diagnostic ol li').count()).to.be.greaterThan(0);
    expect(await page.locator('.diagnostic ol').textContent()).to.contain('Eastern white pine');
    expect(await seriousViolations(page)).to.deep.equal([]);

    // Poison sumac's own cautions lead its page: all parts carry urushiol and blister the skin
    // (Gillis, Rhodora 73, 1971, on Toxicodendron; from memory).
    await page.goto(`${running.baseUrl}/species/toxicodendron-vernix`);
    await page.locator('h1', { hasText: /sumac/i }).waitFor();
    expect(await page.locator('.cautions li.species-caution').first().textContent()).to.match(/rash/i);
    // Atlantic white-cedar's page also warns about its look-alike northern white-cedar, whose foliage
    // oil holds thujone (PDR for Herbal Medicines, Thuja occidentalis; from memory).
    await page.goto(`${running.baseUrl}/species/chamaecyparis-thyoides`);
    await page.locator('h1', { hasText: /white-cedar/i }).waitFor();
    const lookAlike = page.locator('.cautions li.look-alike-caution', { hasText: /thujone/ });
    expect(await lookAlike.count()).to.equal(1);
    expect(await lookAlike.textContent()).to.match(/^Look-alike Northern white-cedar: /);
    await context.close();
  });

  it('runs the engine in well under a frame per chip change and keeps the initial JavaScript small', async () => {
    const context = await running.newContext({ viewport: { width: 1280, height: 900 }, serviceWorkers: 'block' });
    const page = await context.newPage();
    await page.goto(`${running.baseUrl}/sift?season=leaf-on&leeway=2`);
    await waitForSift(page);
    await page.evaluate(() => performance.clearMeasures('sylvasift:engine'));
    await openPart(page, 'Leaf');
    await openPart(page, 'Bark');
    const taps: Array<[string, string]> = [
      ['foliage', 'broad'],
      ['leaf-arrangement', 'alternate'],
      ['leaf-type', 'simple'],
      ['leaf-lobing', 'pinnately-lobed'],
      ['lobe-tips', 'rounded'],
      ['bark-texture', 'scaly'],
      ['bark-texture', 'scaly'],
      ['lobe-tips', 'rounded'],
      ['leaf-arrangement', 'alternate'],
      ['leaf-arrangement', 'alternate'],
    ];
    for (const [trait, answer] of taps) {
      const before = await page.evaluate(() => performance.getEntriesByName('sylvasift:engine').length);
      await tapChip(page, trait, answer);
      await page.waitForFunction((count) => performance.getEntriesByName('sylvasift:engine').length > count, before);
    }
    const durations = await page.evaluate(() => performance.getEntriesByName('sylvasift:engine').map((entry) => entry.duration));
    expect(durations.length).to.be.at.least(taps.length);
    const middle = median(durations);
    console.log(
      `      engine (rank + suggest) per chip change: median ${middle.toFixed(2)} ms, max ${Math.max(...durations).toFixed(2)} ms over ${durations.length} changes`,
    );
    // One frame at 60 Hz is 16.7 ms (common practice, no source).
    expect(middle).to.be.at.most(16);
    await context.close();

    // The initial JavaScript: the scripts index.html loads before any route, gzip-compressed.
    const html = fs.readFileSync(path.join(WEB_ROOT, 'index.html'), 'utf8');
    const scripts = [...html.matchAll(/<(?:script[^>]*src|link[^>]*rel="modulepreload"[^>]*href)="([^"]+\.js)"/g)].map((match) => match[1]);
    expect(scripts.length).to.be.greaterThan(0);
    const compressed = scripts.reduce((sum, file) => sum + zlib.gzipSync(fs.readFileSync(path.join(WEB_ROOT, file)), { level: 9 }).length, 0);
    console.log(`      initial JavaScript: ${scripts.length} files, ${(compressed / 1024).toFixed(1)} kB gzip`);
    // Budget: the build measured 160 kB gzip (11 files) when this was set; 200 kB leaves a quarter for
    // growth and still catches a library or a page pulled into the first load by mistake. Raise it
    // deliberately, with the new measurement, when the app grows. common practice, no source
    expect(compressed, 'initial JavaScript, gzip').to.be.below(INITIAL_JS_GZIP_BUDGET);
  });
});
