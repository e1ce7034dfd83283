import { validateMatrix, type Cell, type MatrixDocument, type MatrixProblem } from '@shared/engine';
import { HttpProblem, type InvalidParam } from '../http/problem';

/**
 * Cell rules the engine reports only as warnings, because compilation can repair them in a document
 * read from elsewhere, but which the contract states for every cell a curator writes: a numeric range
 * reads min ≤ low ≤ high ≤ max. The working matrix treats them as errors.
 */
const CURATED_CELL_RULES: ReadonlySet<string> = new Set(['range-out-of-order']);

const RANGE_FIELDS = ['min', 'low', 'high', 'max'] as const;

/** Every problem of a working-matrix document, with the curated cell rules counted as errors. */
export function curatedProblems(document: MatrixDocument): MatrixProblem[] {
  return validateMatrix(document).map((problem) =>
    problem.severity === 'warning' && CURATED_CELL_RULES.has(problem.code)
      ? // the engine's words say how compilation repairs the cell; here the cell is refused instead
        { ...problem, severity: 'error' as const, message: problem.message.replace(/; it is compiled sorted\.$/, '.') }
      : problem,
  );
}

/** The errors a curated matrix may not have (the engine's errors and the curated cell rules). */
export function matrixErrors(document: MatrixDocument): MatrixProblem[] {
  return curatedProblems(document).filter((problem) => problem.severity === 'error');
}

/** True for a problem with one cell (as opposed to a trait, a taxon or the document). */
export function isCellProblem(problem: MatrixProblem): problem is MatrixProblem & { taxon: string; trait: string } {
  return problem.taxon !== undefined && problem.trait !== undefined && /^taxa\[\d+\]\.cells\./.test(problem.path);
}

function problemList(errors: MatrixProblem[]) {
  return errors.map((problem) => ({
    code: problem.code,
    path: problem.path,
    message: problem.message,
    taxon: problem.taxon ?? null,
    trait: problem.trait ?? null,
  }));
}

/** 422: the change would leave the matrix with errors; every error is listed. */
export function matrixInvalid(detail: string, errors: MatrixProblem[], invalidParams?: InvalidParam[]): HttpProblem {
  return new HttpProblem(422, 'matrix-invalid', 'The matrix would have errors', detail, {
    'invalid-params': invalidParams ?? errors.map((problem) => ({ name: problem.path, reason: problem.message })),
    errors: problemList(errors),
  });
}

/** The fields of a numeric range that break min ≤ low ≤ high ≤ max or are negative. */
function badRangeFields(problem: MatrixProblem, value: Cell): string[] {
  if (typeof value !== 'object' || !('low' in value)) return [];
  const range = value as Record<(typeof RANGE_FIELDS)[number], number>;
  if (problem.code === 'range-negative') return RANGE_FIELDS.filter((field) => range[field] < 0);
  const fields = new Set<string>();
  for (let i = 0; i < RANGE_FIELDS.length - 1; i++) {
    const [smaller, larger] = [RANGE_FIELDS[i]!, RANGE_FIELDS[i + 1]!];
    if (range[smaller] > range[larger]) {
      fields.add(smaller);
      fields.add(larger);
    }
  }
  return [...fields];
}

/**
 * Where in the request body (`/value/…`) a problem with the one cell being written lies: the range
 * fields out of order or negative, the frequency list holding a bad value, or the whole value.
 */
function cellBodyFields(problem: MatrixProblem, value: Cell): string[] {
  if (!isCellProblem(problem)) return [problem.path];
  if (problem.code === 'range-out-of-order' || problem.code === 'range-negative') {
    const fields = badRangeFields(problem, value);
    if (fields.length > 0) return fields.map((field) => `/body/value/${field}`);
  }
  const inside = problem.path.replace(/^taxa\[\d+\]\.cells\.[^.]+/, '');
  return [`/body/value${inside.replace(/\./g, '/')}`];
}

/** 422 for one cell write: names the fields of the value that break the cell rules. */
export function cellInvalid(what: string, value: Cell, errors: MatrixProblem[]): HttpProblem {
  const invalidParams = errors.flatMap((problem) => cellBodyFields(problem, value).map((name) => ({ name, reason: problem.message })));
  return matrixInvalid(`${what} was not saved: ${errors.map((problem) => problem.message).join(' ')}`, errors, invalidParams);
}

/** The cells of a matrix that break a cell rule, one entry per cell with every message. */
export function invalidCells(errors: MatrixProblem[]): Array<{ taxonId: string; traitCode: string; problems: string[] }> {
  const byCell = new Map<string, { taxonId: string; traitCode: string; problems: string[] }>();
  for (const problem of errors.filter(isCellProblem)) {
    const key = `${problem.taxon}/${problem.trait}`;
    const entry = byCell.get(key) ?? { taxonId: problem.taxon, traitCode: problem.trait, problems: [] };
    entry.problems.push(problem.message);
    byCell.set(key, entry);
  }
  return [...byCell.values()];
}

/**
 * Throws when the document may not be published: 409 while any cell breaks a cell rule (the cells
 * are named, to be fixed on the Matrix desk first), 422 for any other error.
 */
export function assertPublishable(document: MatrixDocument, what: string): void {
  const errors = matrixErrors(document);
  if (errors.length === 0) return;
  const cells = invalidCells(errors);
  if (cells.length > 0) {
    const named = cells
      .slice(0, 5)
      .map((cell) => `${cell.taxonId} × ${cell.traitCode}`)
      .join(', ');
    throw new HttpProblem(
      409,
      'invalid-cells',
      'Some cells break the cell rules',
      `${what}: ${cells.length} cell${cells.length === 1 ? '' : 's'} must be fixed first (${named}${cells.length > 5 ? ', …' : ''}).`,
      {
        'invalid-params': cells.map((cell) => ({ name: `${cell.taxonId}/${cell.traitCode}`, reason: cell.problems.join(' ') })),
        cells,
        errors: problemList(errors),
      },
    );
  }
  throw matrixInvalid(`${what}: the matrix has ${errors.length} error${errors.length === 1 ? '' : 's'}. ${errors[0]?.message ?? ''}`.trim(), errors);
}
