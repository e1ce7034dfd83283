/**
 * A coded cell in words, in the two registers the product uses.
 *
 * - `cellInWords`, the sentence form, for reasons, look-alike diagnostics and the API:
 *   "usually smooth or deeply furrowed, occasionally plated", "typically 12–18 cm, recorded 10–23 cm".
 * - `cellInBrief`, the table form, for species pages, Side by side, study sheets and the Second look:
 *   "Smooth, deeply furrowed; occasionally plated", "12–18 cm (10–23)".
 *
 * Invariant: both read the same labels (valueLabel), numbers (formatNumber) and words for a cell
 * that is not coded or does not apply, so the two registers never disagree on what a cell says.
 */
import { isInapplicableCell, isNumericCell, isUnknownCell } from './cells';
import type { Cell, NumericCell } from './types';
import { FREQUENCIES } from './vocabulary';
import { formatNumber, inSentence, joinOr, valueLabel, type LabelledTrait } from './words';

/** What a cell that is not coded yet reads as. */
export const NOT_CODED_WORDS = 'not coded';
/** What a cell whose trait does not exist on the taxon reads as. */
export const NOT_APPLICABLE_WORDS = 'not applicable';

const FREQUENCY_ADVERBS = Object.freeze({ usual: 'usually', occasional: 'occasionally', rare: 'rarely' } as const);

/** Whether the recorded extremes reach beyond the typical range. */
function hasExtremes(cell: NumericCell): boolean {
  return cell.min < cell.low || cell.max > cell.high;
}

/** The sentence form: "usually 2 or 3, occasionally 4"; "typically 12–18 cm, recorded 10–23 cm". */
export function cellInWords(trait: LabelledTrait, cell: Cell): string {
  if (isUnknownCell(cell)) return NOT_CODED_WORDS;
  if (isInapplicableCell(cell)) return NOT_APPLICABLE_WORDS;
  if (isNumericCell(cell)) {
    const typical = `typically ${formatNumber(cell.low)}–${formatNumber(cell.high)} cm`;
    return hasExtremes(cell) ? `${typical}, recorded ${formatNumber(cell.min)}–${formatNumber(cell.max)} cm` : typical;
  }
  const parts: string[] = [];
  for (const frequency of FREQUENCIES) {
    const values = cell[frequency];
    if (values?.length) parts.push(`${FREQUENCY_ADVERBS[frequency]} ${joinOr(values.map((value) => inSentence(valueLabel(trait, value))))}`);
  }
  return parts.join(', ');
}

function span(from: number, to: number): string {
  return from === to ? formatNumber(from) : `${formatNumber(from)}–${formatNumber(to)}`;
}

/** The table form: "3 per bundle; occasionally 2", "15–23 cm (10–25)". */
export function cellInBrief(trait: LabelledTrait, cell: Cell): string {
  if (isUnknownCell(cell)) return NOT_CODED_WORDS;
  if (isInapplicableCell(cell)) return NOT_APPLICABLE_WORDS;
  if (isNumericCell(cell)) {
    const typical = `${span(cell.low, cell.high)} cm`;
    return hasExtremes(cell) ? `${typical} (${span(cell.min, cell.max)})` : typical;
  }
  // only the very first label keeps its capital: "Scales, awl-shaped; occasionally flattened"
  const words = (values: ReadonlyArray<string | number> | undefined, first: boolean) =>
    (values ?? []).map((value, i) => (first && i === 0 ? valueLabel(trait, value) : inSentence(valueLabel(trait, value)))).join(', ');
  const parts = [words(cell.usual, true)];
  const opening = parts[0] === '';
  if (cell.occasional?.length) parts.push(`${FREQUENCY_ADVERBS.occasional} ${words(cell.occasional, false)}`);
  if (cell.rare?.length) parts.push(`${FREQUENCY_ADVERBS.rare} ${words(cell.rare, false)}`);
  if (opening && parts.length > 1) parts[1] = parts[1].charAt(0).toUpperCase() + parts[1].slice(1);
  return parts.filter((part) => part !== '').join('; ');
}
