/**
 * The Matrix desk grid's model: columns ordered by plant part, the window of columns on screen, and
 * each cell as the grid shows it.
 *
 * Invariant: everything here is a pure function of its arguments (no Angular, no DOM), so the grid's
 * sums can be checked without a browser.
 */
import { type Cell, PART_LABELS, PLANT_PARTS, type PlantPart, type Trait, cellInWords, isNumericCell, valueLabel } from '@shared/engine';

export type Frequency = 'usual' | 'occasional' | 'rare';
const FREQUENCY_ORDER: readonly Frequency[] = ['usual', 'occasional', 'rare'];

/** One trait column of the grid. */
export interface GridColumn {
  /** position among all the grid's columns (before filtering), stable while the matrix is loaded */
  key: number;
  /** the trait's position in the matrix's list of traits (the order packed cells come in) */
  position: number;
  trait: Trait;
  part: PlantPart;
}

/** A cell as the grid draws it, with the words a screen reader announces. */
export type CellView =
  | { kind: 'unknown'; words: string }
  | { kind: 'inapplicable'; words: string }
  | { kind: 'range'; text: string; words: string }
  | { kind: 'values'; values: ReadonlyArray<{ label: string; frequency: Frequency }>; words: string };

/** The traits as grid columns, grouped by plant part in the product's part order (stable inside a part). */
export function orderColumns(traits: readonly Trait[]): GridColumn[] {
  const rank = (part: PlantPart) => PLANT_PARTS.indexOf(part);
  return traits
    .map((trait, index) => ({ trait, index }))
    .sort((a, b) => rank(a.trait.part) - rank(b.trait.part) || a.index - b.index)
    .map(({ trait, index }, key) => ({
      key,
      position: index,
      trait,
      part: trait.part,
    }));
}

/** The columns the part and trait filters leave, in grid order. */
export function filterColumns(columns: readonly GridColumn[], parts: readonly PlantPart[], traitWords: string): GridColumn[] {
  const words = traitWords.trim().toLowerCase();
  return columns.filter(
    (column) =>
      (parts.length === 0 || parts.includes(column.part)) &&
      (words === '' || column.trait.label.toLowerCase().includes(words) || column.trait.code.includes(words)),
  );
}

/**
 * Which columns to draw: those any part of which is inside the visible width, plus `overscan` on each
 * side so a quick scroll does not show blank space. `last` is exclusive.
 */
export function columnWindow(scrollLeft: number, visibleWidth: number, columnWidth: number, count: number, overscan = 2): { first: number; last: number } {
  if (count === 0 || columnWidth <= 0) return { first: 0, last: 0 };
  const first = Math.max(0, Math.floor(Math.max(0, scrollLeft) / columnWidth) - overscan);
  const last = Math.min(count, Math.ceil((Math.max(0, scrollLeft) + Math.max(0, visibleWidth)) / columnWidth) + overscan);
  return { first, last: Math.max(first, last) };
}

/** Runs of neighbouring columns of one plant part inside a window, for the grouped header. */
export function partSegments(
  columns: readonly GridColumn[],
  first: number,
  last: number,
): Array<{ part: PlantPart; label: string; start: number; count: number }> {
  const segments: Array<{ part: PlantPart; label: string; start: number; count: number }> = [];
  for (let index = first; index < last; index++) {
    const part = columns[index]!.part;
    const previous = segments.at(-1);
    if (previous && previous.part === part) previous.count++;
    else segments.push({ part, label: PART_LABELS[part], start: index, count: 1 });
  }
  return segments;
}

function formatNumber(value: number): string {
  return Number.isInteger(value) ? String(value) : String(Math.round(value * 100) / 100);
}

/** A numeric range as the grid writes it: `min (low–high) max` and the unit. */
export function rangeText(cell: { min: number; low: number; high: number; max: number }, unit: string): string {
  return `${formatNumber(cell.min)} (${formatNumber(cell.low)}–${formatNumber(cell.high)}) ${formatNumber(cell.max)} ${unit}`;
}

/** How a cell reads aloud, in the engine's words: "usually furrowed, occasionally scaly", "typically 12–23 cm, recorded 10–25 cm". */
export function cellWords(trait: Pick<Trait, 'values'>, cell: Cell): string {
  return cellInWords(trait, cell);
}

/** The cell as the grid draws it. */
export function cellView(column: GridColumn, cell: Cell | undefined): CellView {
  const value = cell ?? 'unknown';
  const words = cellWords(column.trait, value);
  if (value === 'unknown') return { kind: 'unknown', words };
  if (value === 'inapplicable') return { kind: 'inapplicable', words };
  if (isNumericCell(value)) return { kind: 'range', text: rangeText(value, column.trait.unit ?? 'cm'), words };
  const values = FREQUENCY_ORDER.flatMap((frequency) => (value[frequency] ?? []).map((code) => ({ label: valueLabel(column.trait, code), frequency })));
  return { kind: 'values', values, words };
}

/** The index after a key press in a grid of `rows` × `columns`, or null when the key does not move. */
export function movedTo(
  key: string,
  at: { row: number; column: number },
  size: { rows: number; columns: number; pageRows: number },
  withControl = false,
): { row: number; column: number } | null {
  const clamp = (value: number, count: number) => Math.min(Math.max(0, value), Math.max(0, count - 1));
  const { row, column } = at;
  switch (key) {
    case 'ArrowUp':
      return { row: clamp(row - 1, size.rows), column };
    case 'ArrowDown':
      return { row: clamp(row + 1, size.rows), column };
    case 'ArrowLeft':
      return { row, column: clamp(column - 1, size.columns) };
    case 'ArrowRight':
      return { row, column: clamp(column + 1, size.columns) };
    case 'PageUp':
      return { row: clamp(row - size.pageRows, size.rows), column };
    case 'PageDown':
      return { row: clamp(row + size.pageRows, size.rows), column };
    case 'Home':
      return withControl ? { row: 0, column: 0 } : { row, column: 0 };
    case 'End':
      return withControl
        ? { row: clamp(size.rows - 1, size.rows), column: clamp(size.columns - 1, size.columns) }
        : { row, column: clamp(size.columns - 1, size.columns) };
    default:
      return null;
  }
}
