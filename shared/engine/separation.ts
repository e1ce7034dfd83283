/**
 * Whether, and how strongly, one trait tells two taxa apart, read from the effective coding.
 *
 * Invariant: the relation is symmetric and never separates when either cell is unknown. A trait
 * separates two coded taxa
 *  - *reliably* when nothing either usually shows turns up in the other at all: for value sets, the
 *    usual sets are disjoint and no usual value of one is coded (at any frequency) for the other, or
 *    no value is shared at all; for ranges, the typical ranges are disjoint and neither typical range
 *    reaches into the other's extreme range, or the extreme ranges are disjoint; and when the trait
 *    applies to one of them and not to the other;
 *  - *usually* when only the usual sets (both non-empty) are disjoint, or only the typical ranges are
 *    disjoint (touching ranges overlap): what the two usually show differs, but an occasional or rare
 *    value, or a length near the extremes, can be shared.
 */
import { INAPPLICABLE_PATTERN, RangeField, UNKNOWN_PATTERN, type CompiledMatrix, type CompiledTrait } from './compiled-matrix';
import type { SeparationStrength } from './types';

/** How one trait relates two taxa: separated reliably or usually, overlapping, coded alike, or not coded. */
export type PairRelation = SeparationStrength | 'overlaps' | 'same' | 'unknown';

const USUAL = 0;
const ANY = 1;

/** The usual mask word w (USUAL) or the union of all frequencies (ANY) of a pattern. */
function word(masks: Uint32Array, offset: number, words: number, w: number, which: number): number {
  const usual = masks[offset + w];
  return which === USUAL ? usual : usual | masks[offset + words + w] | masks[offset + 2 * words + w];
}

function discreteRelation(compiled: CompiledMatrix, trait: CompiledTrait, pa: number, pb: number): PairRelation {
  const words = trait.words;
  const offsetA = trait.maskBase + pa * 3 * words;
  const offsetB = trait.maskBase + pb * 3 * words;
  const masks = compiled.masks;
  let anyShared = false;
  let usualShared = false;
  let usualOfOneInOther = false;
  let usualA = false;
  let usualB = false;
  for (let w = 0; w < words; w++) {
    const ua = word(masks, offsetA, words, w, USUAL);
    const ub = word(masks, offsetB, words, w, USUAL);
    const aa = word(masks, offsetA, words, w, ANY);
    const ab = word(masks, offsetB, words, w, ANY);
    if (ua !== 0) usualA = true;
    if (ub !== 0) usualB = true;
    if ((aa & ab) !== 0) anyShared = true;
    if ((ua & ub) !== 0) usualShared = true;
    if ((ua & ab) !== 0 || (ub & aa) !== 0) usualOfOneInOther = true;
  }
  if (!anyShared) return 'reliable';
  if (!usualA || !usualB || usualShared) return 'overlaps';
  return usualOfOneInOther ? 'usual' : 'reliable';
}

export function rangeOf(compiled: CompiledMatrix, trait: CompiledTrait, t: number): { min: number; low: number; high: number; max: number } {
  const n = compiled.taxonCount;
  const block = trait.numericIndex * 4 * n;
  const r = compiled.ranges;
  return {
    min: r[block + RangeField.Min * n + t],
    low: r[block + RangeField.Low * n + t],
    high: r[block + RangeField.High * n + t],
    max: r[block + RangeField.Max * n + t],
  };
}

/** Whether the closed intervals [a0, a1] and [b0, b1] share a point (touching counts). */
function intersect(a0: number, a1: number, b0: number, b1: number): boolean {
  return a0 <= b1 && b0 <= a1;
}

function numericRelation(compiled: CompiledMatrix, trait: CompiledTrait, a: number, b: number): PairRelation {
  const ra = rangeOf(compiled, trait, a);
  const rb = rangeOf(compiled, trait, b);
  if (!intersect(ra.min, ra.max, rb.min, rb.max)) return 'reliable';
  if (intersect(ra.low, ra.high, rb.low, rb.high)) {
    return ra.min === rb.min && ra.low === rb.low && ra.high === rb.high && ra.max === rb.max ? 'same' : 'overlaps';
  }
  const typicalInOtherExtremes = intersect(ra.low, ra.high, rb.min, rb.max) || intersect(rb.low, rb.high, ra.min, ra.max);
  return typicalInOtherExtremes ? 'usual' : 'reliable';
}

/** How one trait relates taxa a and b (indexes). */
export function relation(compiled: CompiledMatrix, trait: CompiledTrait, a: number, b: number): PairRelation {
  const n = compiled.taxonCount;
  const pa = compiled.cellPattern[trait.index * n + a];
  const pb = compiled.cellPattern[trait.index * n + b];
  if (pa === UNKNOWN_PATTERN || pb === UNKNOWN_PATTERN) return 'unknown';
  if (pa === INAPPLICABLE_PATTERN || pb === INAPPLICABLE_PATTERN) return pa === pb ? 'same' : 'reliable';
  if (trait.kind === 'numeric') return numericRelation(compiled, trait, a, b);
  if (pa === pb) return 'same';
  return discreteRelation(compiled, trait, pa, pb);
}

/** How strongly the trait separates taxa a and b, or null when it does not. */
export function separationStrength(compiled: CompiledMatrix, trait: CompiledTrait, a: number, b: number): SeparationStrength | null {
  const found = relation(compiled, trait, a, b);
  return found === 'reliable' || found === 'usual' ? found : null;
}

/**
 * True when no value (any frequency) and no extreme-range length is shared, or the trait applies to
 * exactly one of the two: the strictest sense. Every such separation is also graded `reliable`.
 */
export function separatesCompletely(compiled: CompiledMatrix, trait: CompiledTrait, a: number, b: number): boolean {
  const n = compiled.taxonCount;
  const pa = compiled.cellPattern[trait.index * n + a];
  const pb = compiled.cellPattern[trait.index * n + b];
  if (pa === UNKNOWN_PATTERN || pb === UNKNOWN_PATTERN) return false;
  if (pa === INAPPLICABLE_PATTERN || pb === INAPPLICABLE_PATTERN) return pa !== pb;
  if (trait.kind === 'numeric') {
    const ra = rangeOf(compiled, trait, a);
    const rb = rangeOf(compiled, trait, b);
    return !intersect(ra.min, ra.max, rb.min, rb.max);
  }
  if (pa === pb) return false;
  const words = trait.words;
  const offsetA = trait.maskBase + pa * 3 * words;
  const offsetB = trait.maskBase + pb * 3 * words;
  for (let w = 0; w < words; w++) {
    if ((word(compiled.masks, offsetA, words, w, ANY) & word(compiled.masks, offsetB, words, w, ANY)) !== 0) return false;
  }
  return true;
}
