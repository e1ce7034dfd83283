/**
 * Whether one trait tells two taxa apart, read from the effective coding.
 *
 * Invariant: `separates` is symmetric and never true when either cell is unknown; two taxa are
 * separated only when no value (any frequency) or no extreme-range length is shared, or when the
 * trait applies to one of them and not to the other.
 */
import { INAPPLICABLE_PATTERN, RangeField, UNKNOWN_PATTERN, type CompiledMatrix, type CompiledTrait } from './compiled';

export type PairRelation = 'separates' | 'overlaps' | 'same' | 'unknown';

function unionMasksIntersect(compiled: CompiledMatrix, trait: CompiledTrait, a: number, b: number): boolean {
  const words = trait.words;
  const offsetA = trait.maskBase + a * 3 * words;
  const offsetB = trait.maskBase + b * 3 * words;
  const masks = compiled.masks;
  for (let w = 0; w < words; w++) {
    const unionA = masks[offsetA + w] | masks[offsetA + words + w] | masks[offsetA + 2 * words + w];
    const unionB = masks[offsetB + w] | masks[offsetB + words + w] | masks[offsetB + 2 * words + w];
    if ((unionA & unionB) !== 0) return true;
  }
  return false;
}

export function rangeOf(compiled: CompiledMatrix, trait: CompiledTrait, t: number): { min: number; low: number; high: number; max: number } {
  const n = compiled.taxonCount;
  const block = trait.numericIndex * 4 * n;
  const r = compiled.ranges;
  return { min: r[block + RangeField.Min * n + t], low: r[block + RangeField.Low * n + t], high: r[block + RangeField.High * n + t], max: r[block + RangeField.Max * n + t] };
}

/** How one trait relates taxa a and b (indexes). */
export function relation(compiled: CompiledMatrix, trait: CompiledTrait, a: number, b: number): PairRelation {
  const n = compiled.taxonCount;
  const pa = compiled.cellPattern[trait.index * n + a];
  const pb = compiled.cellPattern[trait.index * n + b];
  if (pa === UNKNOWN_PATTERN || pb === UNKNOWN_PATTERN) return 'unknown';
  if (pa === INAPPLICABLE_PATTERN || pb === INAPPLICABLE_PATTERN) return pa === pb ? 'same' : 'separates';
  if (trait.kind === 'numeric') {
    const ra = rangeOf(compiled, trait, a);
    const rb = rangeOf(compiled, trait, b);
    if (ra.max < rb.min || rb.max < ra.min) return 'separates';
    return ra.min === rb.min && ra.low === rb.low && ra.high === rb.high && ra.max === rb.max ? 'same' : 'overlaps';
  }
  if (pa === pb) return 'same';
  return unionMasksIntersect(compiled, trait, pa, pb) ? 'overlaps' : 'separates';
}

export function separates(compiled: CompiledMatrix, trait: CompiledTrait, a: number, b: number): boolean {
  return relation(compiled, trait, a, b) === 'separates';
}
