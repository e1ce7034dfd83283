/** Helpers for driving the sift page the way a person does: chips, measurements, the shortlist. */
import type { Locator, Page } from 'playwright-core';

/** Waits until the edition is downloaded and the shortlist is on screen. */
export async function waitForSift(page: Page): Promise<void> {
  await page.locator('sv-shortlist .candidate').first().waitFor({ state: 'visible', timeout: 20_000 });
}

/** The trait's section; its part panel must already be open. */
async function openPartOf(page: Page, trait: string): Promise<Locator> {
  const section = page.locator(`#trait-${trait}`);
  await section.waitFor({ state: 'visible', timeout: 5_000 });
  return section;
}

/** Opens a plant-part panel of the trait picker by its heading. */
export async function openPart(page: Page, label: string): Promise<void> {
  const header = page.locator('sv-trait-picker mat-expansion-panel-header', { has: page.locator('.part-title', { hasText: new RegExp(`^${label}$`) }) });
  if ((await header.getAttribute('aria-expanded')) !== 'true') await header.click();
  await header.locator('xpath=..').locator('.trait').first().waitFor();
}

/** Taps one chip of a trait (the part must be open). */
export async function tapChip(page: Page, trait: string, answer: string | number): Promise<void> {
  await openPartOf(page, trait);
  await page.locator(`#chip-${trait}-${answer} [role="option"]`).click();
}

/** Types a measurement and picks its unit (the part must be open). */
export async function measure(page: Page, trait: string, value: number, unit: 'cm' | 'in'): Promise<void> {
  const section = await openPartOf(page, trait);
  await section
    .locator('mat-button-toggle', { hasText: new RegExp(`^${unit}$`) })
    .locator('button')
    .click();
  const input = section.locator('input[type="number"]');
  await input.fill(String(value));
  await input.press('Enter');
  await input.blur();
}

/** Taxon ids of the shortlist, best first. */
export async function shortlistIds(page: Page): Promise<string[]> {
  return page.locator('sv-shortlist .candidates > .candidate').evaluateAll((items) => items.map((item) => item.getAttribute('data-taxon') ?? ''));
}

/** Waits until the shortlist's first species is `id`. */
export async function waitForLeader(page: Page, id: string): Promise<void> {
  await page.locator(`sv-shortlist .candidates > .candidate:first-child[data-taxon="${id}"]`).waitFor({ timeout: 10_000 });
}

/** The Seen so far chips, as their visible text. */
export async function seenSoFar(page: Page): Promise<string[]> {
  return page.locator('sv-seen-so-far mat-chip').evaluateAll((chips) =>
    chips.map((chip) =>
      (chip.textContent ?? '')
        .replace(/cancel/g, '')
        .replace(/\s+/g, ' ')
        .trim(),
    ),
  );
}
