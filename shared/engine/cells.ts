/**
 * Telling a coded cell's four shapes apart.
 *
 * Invariant: every Cell satisfies exactly one of isUnknownCell, isInapplicableCell, isNumericCell
 * and isDiscreteCell; `undefined` (a cell missing from a document) satisfies none.
 */
import type { Cell, DiscreteCell, NumericCell } from './types';

/** Not coded yet: never counts against a taxon. */
export function isUnknownCell(cell: Cell | undefined): cell is 'unknown' {
  return cell === 'unknown';
}

/** The trait does not exist on this taxon: conflicts with any observation of it. */
export function isInapplicableCell(cell: Cell | undefined): cell is 'inapplicable' {
  return cell === 'inapplicable';
}

/** A range min ≤ low ≤ high ≤ max, for numeric traits. */
export function isNumericCell(cell: Cell | undefined): cell is NumericCell {
  return typeof cell === 'object' && cell !== null && 'min' in cell;
}

/** Values grouped by frequency, for state and count traits. */
export function isDiscreteCell(cell: Cell | undefined): cell is DiscreteCell {
  return typeof cell === 'object' && cell !== null && !('min' in cell);
}
