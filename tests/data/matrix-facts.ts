/**
 * Small readers shared by the data checks: the core glossary, cell shapes, appliesWhen and
 * pairwise separation, written independently of the engine so the checks do not trust it.
 *
 * Invariant: nothing here changes the matrix; every function is pure over the loaded document.
 */
import { existsSync, readFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { isDiscreteCell, isNumericCell, type DiscreteCell, type PlantPart, type Season, type Taxon, type Trait, type TraitKind } from '@shared/engine';

export const DATA_TESTS_DIR = dirname(fileURLToPath(import.meta.url));
export const REPO_DIR = resolve(DATA_TESTS_DIR, '..', '..');
export const TAXA_DIR = join(REPO_DIR, 'seeds', 'matrix', 'taxa');

export interface GlossaryValue {
  code: string;
  label: string;
  definition?: string;
}

export interface GlossaryTrait {
  code: string;
  part: PlantPart;
  kind: TraitKind;
  season: Season;
  label: string;
  unit?: 'cm';
  values?: GlossaryValue[];
  appliesWhen?: Record<string, string[]>;
}

export interface Glossary {
  traits: GlossaryTrait[];
}

/** The core glossary beside the checkout, or the committed copy when the checkout stands alone. */
export function loadGlossary(): { glossary: Glossary; path: string } {
  const beside = join(REPO_DIR, '..', 'shared', 'trait-glossary.json');
  const path = existsSync(beside) ? beside : join(DATA_TESTS_DIR, 'fixtures', 'trait-glossary.json');
  return { glossary: JSON.parse(readFileSync(path, 'utf8')) as Glossary, path };
}

/** Every value a discrete cell mentions, whatever its frequency. */
export function valuesOf(cell: DiscreteCell): Array<string | number> {
  return [...(cell.usual ?? []), ...(cell.occasional ?? []), ...(cell.rare ?? [])];
}

/**
 * Whether a trait applies to a taxon under its appliesWhen: false when a condition trait is
 * inapplicable or coded with none of the allowed values; true otherwise (an uncoded condition
 * cannot rule the trait out).
 */
export function traitApplies(trait: Trait, taxon: Taxon): boolean {
  for (const [condition, allowed] of Object.entries(trait.appliesWhen ?? {})) {
    const cell = taxon.cells[condition];
    if (cell === 'inapplicable') return false;
    if (isDiscreteCell(cell) && !valuesOf(cell).some((value) => allowed.includes(String(value)))) return false;
  }
  return true;
}

/**
 * The traits that separate two taxa: both coded, and either their usual value sets do not
 * intersect or their typical numeric ranges do not overlap (touching ranges overlap).
 */
export function separatingTraits(a: Taxon, b: Taxon, traits: Trait[]): string[] {
  const found: string[] = [];
  for (const trait of traits) {
    const ca = a.cells[trait.code];
    const cb = b.cells[trait.code];
    if (isNumericCell(ca) && isNumericCell(cb)) {
      if (ca.high < cb.low || cb.high < ca.low) found.push(trait.code);
    } else if (isDiscreteCell(ca) && isDiscreteCell(cb)) {
      const usualA = (ca.usual ?? []).map(String);
      const usualB = (cb.usual ?? []).map(String);
      if (usualA.length > 0 && usualB.length > 0 && !usualA.some((value) => usualB.includes(value))) found.push(trait.code);
    }
  }
  return found;
}

export function genusOf(taxon: Taxon): string {
  return taxon.scientificName.split(' ')[0];
}

/** A pair key that does not depend on order. */
export function pairKey(a: string, b: string): string {
  return a < b ? `${a}|${b}` : `${b}|${a}`;
}
