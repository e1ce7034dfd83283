/**
 * Lookups into a compiled matrix: taxa and traits by id/code, coded cells back as document cells.
 *
 * Invariant: cellOf returns the cell as coded (before appliesWhen turned it inapplicable for scoring),
 * with ranges sorted; effectiveCellOf returns what the scorer uses.
 */
import { INAPPLICABLE_PATTERN, RangeField, UNKNOWN_PATTERN, type CompiledMatrix, type CompiledTrait } from './compiled-matrix';
import { EngineUsageError, usageMessages } from './errors';
import type { Cell, DiscreteCell } from './types';

/** Index of a taxon in the compiled matrix, or -1 when the edition does not have it. */
export function taxonIndex(compiled: CompiledMatrix, id: string): number {
  return compiled.taxonIndexById.get(id) ?? -1;
}

/** The compiled trait with this code, or undefined. */
export function traitByCode(compiled: CompiledMatrix, code: string): CompiledTrait | undefined {
  const index = compiled.traitIndexByCode.get(code);
  return index === undefined ? undefined : compiled.traits[index];
}

export function requireTaxon(compiled: CompiledMatrix, id: string): number {
  const index = taxonIndex(compiled, id);
  if (index < 0) throw new EngineUsageError(usageMessages.unknownTaxon(id));
  return index;
}

export function requireTrait(compiled: CompiledMatrix, code: string): CompiledTrait {
  const trait = traitByCode(compiled, code);
  if (!trait) throw new EngineUsageError(usageMessages.unknownTraitCode(code));
  return trait;
}

/** The coded pattern of a cell: the effective one unless appliesWhen overrode it. */
export function codedPattern(compiled: CompiledMatrix, traitIndex: number, t: number): number {
  const key = traitIndex * compiled.taxonCount + t;
  const keys = compiled.overrideKeys;
  let low = 0;
  let high = keys.length - 1;
  while (low <= high) {
    const middle = (low + high) >>> 1;
    if (keys[middle] === key) return compiled.overrideCoded[middle];
    if (keys[middle] < key) low = middle + 1;
    else high = middle - 1;
  }
  return compiled.cellPattern[key];
}

/** The document cell a pattern stands for. */
export function cellFromPattern(compiled: CompiledMatrix, trait: CompiledTrait, pattern: number, t: number): Cell {
  if (pattern === UNKNOWN_PATTERN) return 'unknown';
  if (pattern === INAPPLICABLE_PATTERN) return 'inapplicable';
  const n = compiled.taxonCount;
  if (trait.kind === 'numeric') {
    const block = trait.numericIndex * 4 * n;
    return {
      min: compiled.ranges[block + RangeField.Min * n + t],
      low: compiled.ranges[block + RangeField.Low * n + t],
      high: compiled.ranges[block + RangeField.High * n + t],
      max: compiled.ranges[block + RangeField.Max * n + t],
    };
  }
  const words = trait.words;
  const offset = trait.maskBase + pattern * 3 * words;
  const cell: DiscreteCell = {};
  const names = ['usual', 'occasional', 'rare'] as const;
  for (let f = 0; f < 3; f++) {
    const listed: Array<string | number> = [];
    for (let v = 0; v < trait.answerCount; v++) {
      if ((compiled.masks[offset + f * words + (v >>> 5)] & (1 << (v & 31))) !== 0) listed.push(trait.answerCodes[v]);
    }
    if (listed.length > 0) cell[names[f]] = listed;
  }
  return cell;
}

/** The coded cell of a taxon for a trait, for display (species page, Side by side). */
export function cellOf(compiled: CompiledMatrix, taxonId: string, traitCode: string): Cell {
  const t = requireTaxon(compiled, taxonId);
  const trait = requireTrait(compiled, traitCode);
  return cellFromPattern(compiled, trait, codedPattern(compiled, trait.index, t), t);
}

/** The cell as the scorer sees it (inapplicable where appliesWhen rules the trait out). */
export function effectiveCellOf(compiled: CompiledMatrix, trait: CompiledTrait, t: number): Cell {
  return cellFromPattern(compiled, trait, compiled.cellPattern[trait.index * compiled.taxonCount + t], t);
}
