/**
 * Turns one sheet row into the cell it codes, checked against the working matrix's traits.
 *
 * Invariant: a row either yields exactly one cell or at least one problem naming its column; it
 * never yields both, so a sheet with any problem codes nothing.
 */
import type { Cell, DiscreteCell, Frequency, NumericCell, Trait } from '@shared/engine';
import type { SheetColumn, SheetProblem, SheetRow } from './sheet-reading';

const FREQUENCIES: readonly Frequency[] = ['usual', 'occasional', 'rare'];
const RANGE_COLUMNS = ['min', 'low', 'high', 'max'] as const;
/** Separates the values listed in one frequency column. */
const VALUE_SEPARATOR = ';';
const WHOLE_NUMBER = /^[+-]?\d+$/;
const DECIMAL = /^[+-]?(\d+(\.\d*)?|\.\d+)$/;

export type RowCoding = { cell: Cell } | { problems: SheetProblem[] };

function listed(field: string): string[] {
  return field
    .split(VALUE_SEPARATOR)
    .map((value) => value.trim())
    .filter((value) => value !== '');
}

/** Quotes a piece of a sheet for a message, cut short so a huge field cannot flood the answer. */
export function quoted(text: string): string {
  return JSON.stringify(text.length > 60 ? `${text.slice(0, 57)}...` : text);
}

/** The cell a row codes for `trait`, or what is wrong with the row. */
export function codeRow(sheetRow: SheetRow, trait: Trait): RowCoding {
  const { row, fields } = sheetRow;
  const problem = (column: SheetColumn, message: string): SheetProblem => ({ row, column, message });
  const filled = (columns: readonly SheetColumn[]) => columns.filter((column) => fields[column] !== '');

  const state = fields.state.toLowerCase();
  if (state !== '') {
    if (state !== 'unknown' && state !== 'inapplicable') {
      return { problems: [problem('state', `state must be "unknown" or "inapplicable", not ${quoted(fields.state)}.`)] };
    }
    const alsoGiven = filled([...FREQUENCIES, ...RANGE_COLUMNS]);
    if (alsoGiven.length > 0) return { problems: alsoGiven.map((column) => problem(column, `The row is marked ${state}; leave ${column} empty.`)) };
    return { cell: state };
  }
  return trait.kind === 'numeric' ? codeRange(trait, filled, problem, fields) : codeValues(trait, filled, problem, fields);
}

type Filled = (columns: readonly SheetColumn[]) => SheetColumn[];
type ProblemAt = (column: SheetColumn, message: string) => SheetProblem;

function codeRange(trait: Trait, filled: Filled, problem: ProblemAt, fields: Record<SheetColumn, string>): RowCoding {
  const misplaced = filled(FREQUENCIES).map((column) =>
    problem(column, `${trait.code} is a numeric trait: give min, low, high and max in ${trait.unit ?? 'cm'}, not values in ${column}.`),
  );
  if (misplaced.length > 0) return { problems: misplaced };
  if (filled(RANGE_COLUMNS).length === 0)
    return { problems: [problem('low', 'The row has no range and no state; give low and high (and min, max), or state unknown / inapplicable.')] };

  const problems: SheetProblem[] = [];
  const number = (column: (typeof RANGE_COLUMNS)[number]): number | undefined => {
    const field = fields[column];
    if (field === '') return undefined;
    const value = DECIMAL.test(field) ? Number(field) : Number.NaN;
    if (!Number.isFinite(value) || value < 0)
      problems.push(problem(column, `${column} must be a number of ${trait.unit ?? 'cm'} (0 or more), not ${quoted(field)}.`));
    return value;
  };
  const low = number('low');
  const high = number('high');
  if (low === undefined) problems.push(problem('low', 'low is missing; a range needs at least low and high.'));
  if (high === undefined) problems.push(problem('high', 'high is missing; a range needs at least low and high.'));
  // The extremes default to the typical range when the source gives only one range.
  const min = number('min') ?? low;
  const max = number('max') ?? high;
  if (problems.length > 0 || min === undefined || low === undefined || high === undefined || max === undefined) return { problems };

  const range: NumericCell = { min, low, high, max };
  const order: Array<[(typeof RANGE_COLUMNS)[number], (typeof RANGE_COLUMNS)[number]]> = [
    ['min', 'low'],
    ['low', 'high'],
    ['high', 'max'],
  ];
  for (const [smaller, larger] of order) {
    if (range[smaller] > range[larger])
      problems.push(problem(larger, `min ≤ low ≤ high ≤ max is broken: ${smaller} ${range[smaller]} is more than ${larger} ${range[larger]}.`));
  }
  return problems.length > 0 ? { problems } : { cell: range };
}

function codeValues(trait: Trait, filled: Filled, problem: ProblemAt, fields: Record<SheetColumn, string>): RowCoding {
  const misplaced = filled(RANGE_COLUMNS).map((column) =>
    problem(column, `${trait.code} is a ${trait.kind} trait: list its values in usual, occasional or rare, not a range in ${column}.`),
  );
  if (misplaced.length > 0) return { problems: misplaced };
  if (filled(FREQUENCIES).length === 0)
    return {
      problems: [problem('usual', 'The row has no values and no state; list values in usual (occasional, rare), or give state unknown / inapplicable.')],
    };

  const problems: SheetProblem[] = [];
  const codes = new Set((trait.values ?? []).map((value) => value.code));
  const firstSeen = new Map<string, Frequency>();
  const cell: DiscreteCell = {};
  for (const frequency of FREQUENCIES) {
    const values: Array<string | number> = [];
    for (const value of listed(fields[frequency])) {
      const earlier = firstSeen.get(value);
      if (earlier !== undefined) {
        problems.push(problem(frequency, `${quoted(value)} is listed twice (already in ${earlier}).`));
        continue;
      }
      firstSeen.set(value, frequency);
      if (trait.kind === 'count') {
        if (!WHOLE_NUMBER.test(value)) {
          problems.push(problem(frequency, `${trait.code} is a count: ${quoted(value)} is not a whole number.`));
          continue;
        }
        const count = Number(value);
        const range = trait.countRange;
        if (range && (count < range.min || count > range.max)) {
          problems.push(problem(frequency, `${trait.code} counts run from ${range.min} to ${range.max}; ${count} is outside.`));
          continue;
        }
        values.push(count);
      } else if (codes.has(value)) {
        values.push(value);
      } else {
        problems.push(problem(frequency, `${quoted(value)} is not a value of ${trait.code} (values: ${[...codes].join(', ')}).`));
      }
    }
    if (values.length > 0) cell[frequency] = values;
  }
  return problems.length > 0 ? { problems } : { cell };
}
