/**
 * The set of counts a count trait can take, decided the same way by validation and compilation.
 *
 * Invariant: a count trait's answers are the whole numbers min…max; `countRange` wins when given,
 * otherwise the span covers every labelled count and every count coded in a cell.
 */
import type { Taxon, Trait } from './types';

export const MAX_COUNT_SPAN = 1001;

export interface CountSpan {
  min: number;
  max: number;
}

/** Reads a count written as a number or as a decimal string; undefined when it is not a whole number. */
export function parseCount(value: unknown): number | undefined {
  if (typeof value === 'number') return Number.isInteger(value) ? value : undefined;
  if (typeof value === 'string' && /^\d{1,6}$/.test(value)) return Number(value);
  return undefined;
}

function isCellWithLists(cell: unknown): cell is Record<string, unknown> {
  return typeof cell === 'object' && cell !== null && !Array.isArray(cell);
}

/** The span of a count trait, or undefined when nothing defines one. */
export function countSpanOf(trait: Trait, taxa: readonly Taxon[]): CountSpan | undefined {
  const range = trait.countRange;
  if (range && Number.isInteger(range.min) && Number.isInteger(range.max) && range.min <= range.max) {
    return { min: range.min, max: range.max };
  }
  let min = Infinity;
  let max = -Infinity;
  const note = (value: unknown): void => {
    const count = parseCount(value);
    if (count === undefined || count < 0) return;
    if (count < min) min = count;
    if (count > max) max = count;
  };
  for (const value of trait.values ?? []) note(value.code);
  for (const taxon of taxa) {
    const cell: unknown = taxon.cells?.[trait.code];
    if (!isCellWithLists(cell)) continue;
    for (const frequency of ['usual', 'occasional', 'rare']) {
      const listed = cell[frequency];
      if (Array.isArray(listed)) for (const value of listed) note(value);
    }
  }
  return min <= max ? { min, max } : undefined;
}
