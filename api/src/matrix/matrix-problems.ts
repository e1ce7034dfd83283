import { validateMatrix, type MatrixDocument, type MatrixProblem } from '@shared/engine';
import { HttpProblem } from '../http/problem';

/** 422: the change would leave the matrix with errors; every error is listed. */
export function matrixInvalid(detail: string, errors: MatrixProblem[]): HttpProblem {
  return new HttpProblem(422, 'matrix-invalid', 'The matrix would have errors', detail, {
    'invalid-params': errors.map((problem) => ({ name: problem.path, reason: problem.message })),
    errors: errors.map((problem) => ({ code: problem.code, path: problem.path, message: problem.message, taxon: problem.taxon ?? null, trait: problem.trait ?? null })),
  });
}

/** The errors (not warnings) the engine finds in a matrix document. */
export function matrixErrors(document: MatrixDocument): MatrixProblem[] {
  return validateMatrix(document).filter((problem) => problem.severity === 'error');
}

/** Throws a 422 problem when the document has errors. */
export function assertPublishable(document: MatrixDocument, what: string): void {
  const errors = matrixErrors(document);
  if (errors.length > 0) throw matrixInvalid(`${what}: the matrix has ${errors.length} error${errors.length === 1 ? '' : 's'}. ${errors[0]?.message ?? ''}`.trim(), errors);
}
