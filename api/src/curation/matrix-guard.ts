import type { Transaction } from 'sequelize';
import type { MatrixProblem } from '@shared/engine';
import type { HttpProblem } from '../http/problem';
import type { MatrixModels } from '../matrix/matrix-models';
import type { EditionModels } from '../editions/edition-models';
import { readWorkingMatrix } from '../matrix/matrix-store';
import { matrixErrors, matrixInvalid } from '../matrix/matrix-problems';

function keyOf(problem: MatrixProblem): string {
  return `${problem.code}|${problem.path}|${problem.message}`;
}

/** The working matrix's errors right now (inside the transaction, so it sees uncommitted changes). */
async function currentErrors(models: MatrixModels & EditionModels, transaction: Transaction): Promise<MatrixProblem[]> {
  return matrixErrors(await readWorkingMatrix(models, { title: 'working matrix' }, transaction));
}

/**
 * Runs a change inside the transaction and checks the working matrix afterwards: if the change
 * introduced any error (one the matrix did not have before), it throws a 422 problem and the
 * transaction rolls back, so nothing is written. `refusal` shapes that problem (a cell write names its fields).
 */
export async function changeKeepingMatrixValid<T>(
  models: MatrixModels & EditionModels,
  transaction: Transaction,
  what: string,
  change: () => Promise<T>,
  refusal: (introduced: MatrixProblem[]) => HttpProblem = (introduced) =>
    matrixInvalid(`${what} was not saved: ${introduced[0]?.message ?? 'it would leave the matrix with errors.'}`, introduced),
): Promise<T> {
  const before = new Set((await currentErrors(models, transaction)).map(keyOf));
  const result = await change();
  const introduced = (await currentErrors(models, transaction)).filter((problem) => !before.has(keyOf(problem)));
  if (introduced.length > 0) throw refusal(introduced);
  return result;
}
