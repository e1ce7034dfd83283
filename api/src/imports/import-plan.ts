/**
 * Works out what an import sheet would change in the working matrix, without touching it.
 *
 * Invariant: a plan with problems has no changes that may be written; a plan without problems
 * lists every cell the sheet changes exactly once, and leaves the matrix free of new errors.
 */
import {
  isDiscreteCell,
  isNumericCell,
  type Cell,
  type DiscreteCell,
  type Frequency,
  type MatrixDocument,
  type MatrixProblem,
  type Trait,
} from '@shared/engine';
import { matrixErrors } from '../matrix/matrix-problems';
import { codeRow, quoted } from './row-coding';
import type { Sheet, SheetColumn, SheetProblem } from './sheet-reading';

export interface CellImportChange {
  row: number;
  taxon: string;
  trait: string;
  before: Cell;
  after: Cell;
}

export interface ImportPlan {
  /** data rows read (the header not counted) */
  rows: number;
  changes: CellImportChange[];
  /** rows that code a cell exactly as it already is */
  unchanged: number;
  problems: SheetProblem[];
}

const FREQUENCIES: readonly Frequency[] = ['usual', 'occasional', 'rare'];

function sortedValues(cell: DiscreteCell, frequency: Frequency): string {
  return JSON.stringify((cell[frequency] ?? []).map(String).sort());
}

/** Two codings of a cell mean the same, whatever order the values were listed in. */
export function sameCell(a: Cell, b: Cell): boolean {
  if (typeof a === 'string' || typeof b === 'string') return a === b;
  if (isNumericCell(a) || isNumericCell(b)) {
    return isNumericCell(a) && isNumericCell(b) && a.min === b.min && a.low === b.low && a.high === b.high && a.max === b.max;
  }
  return isDiscreteCell(a) && isDiscreteCell(b) && FREQUENCIES.every((frequency) => sortedValues(a, frequency) === sortedValues(b, frequency));
}

/** Compares each sheet row with the working matrix: what would change, what is already so, what is wrong. */
export function planImport(sheet: Sheet, matrix: MatrixDocument): ImportPlan {
  const problems: SheetProblem[] = [...sheet.problems];
  const unreadableRows = new Set(sheet.problems.map((problem) => problem.row));
  const traits = new Map(matrix.traits.map((trait) => [trait.code, trait]));
  const taxa = new Map(matrix.taxa.map((taxon) => [taxon.id, taxon]));
  const rowOfCell = new Map<string, number>();
  const changes: CellImportChange[] = [];
  let unchanged = 0;

  for (const sheetRow of sheet.rows) {
    if (unreadableRows.has(sheetRow.row)) continue;
    const { row, fields } = sheetRow;
    const taxon = taxa.get(fields.taxon);
    const trait = traits.get(fields.trait);
    if (!taxon)
      problems.push({
        row,
        column: 'taxon',
        message: fields.taxon === '' ? 'taxon is missing.' : `There is no taxon ${quoted(fields.taxon)} in the working matrix.`,
      });
    if (!trait)
      problems.push({
        row,
        column: 'trait',
        message: fields.trait === '' ? 'trait is missing.' : `There is no trait ${quoted(fields.trait)} in the working matrix.`,
      });
    if (!taxon || !trait) continue;

    const key = `${taxon.id}\u0000${trait.code}`;
    const earlier = rowOfCell.get(key);
    if (earlier !== undefined) {
      problems.push({ row, column: 'trait', message: `Row ${earlier} already codes ${taxon.id} × ${trait.code}; each cell may appear once.` });
      continue;
    }
    rowOfCell.set(key, row);

    const coding = codeRow(sheetRow, trait);
    if ('problems' in coding) {
      problems.push(...coding.problems);
      continue;
    }
    const before = taxon.cells[trait.code] ?? 'unknown';
    if (sameCell(before, coding.cell)) unchanged += 1;
    else changes.push({ row, taxon: taxon.id, trait: trait.code, before, after: coding.cell });
  }

  if (problems.length === 0) problems.push(...errorsIntroduced(matrix, changes));
  return { rows: sheet.rows.length, changes, unchanged, problems: problems.sort((a, b) => a.row - b.row) };
}

/** Matrix-wide checks (what a cell may hold given other cells) on the matrix as the sheet would leave it. */
function errorsIntroduced(matrix: MatrixDocument, changes: CellImportChange[]): SheetProblem[] {
  if (changes.length === 0) return [];
  const keyOf = (problem: MatrixProblem) => `${problem.code}|${problem.path}|${problem.message}`;
  const before = new Set(matrixErrors(matrix).map(keyOf));
  const changed = new Map(changes.map((change) => [`${change.taxon}\u0000${change.trait}`, change]));
  const after: MatrixDocument = {
    ...matrix,
    taxa: matrix.taxa.map((taxon) => {
      const cells = { ...taxon.cells };
      for (const trait of matrix.traits) {
        const change = changed.get(`${taxon.id}\u0000${trait.code}`);
        if (change) cells[trait.code] = change.after;
      }
      return { ...taxon, cells };
    }),
  };
  const traits = new Map(matrix.traits.map((trait) => [trait.code, trait]));
  return matrixErrors(after)
    .filter((problem) => !before.has(keyOf(problem)))
    .map((problem) => {
      const change = changed.get(`${problem.taxon ?? ''}\u0000${problem.trait ?? ''}`);
      const row = change?.row ?? changes[0]!.row;
      return { row, column: change ? columnFor(change.after, traits.get(change.trait)) : null, message: problem.message };
    });
}

function columnFor(cell: Cell, trait: Trait | undefined): SheetColumn {
  if (typeof cell === 'string') return 'state';
  return trait?.kind === 'numeric' ? 'low' : 'usual';
}
