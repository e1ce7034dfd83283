import type { Sequelize } from 'sequelize';
import type { Cell } from '@shared/engine';
import type { MatrixModels } from '../matrix/matrix-models';
import type { EditionModels } from '../editions/edition-models';
import { problems } from '../http/problem';
import { recordAudit, type Actor } from '../matrix/audit-store';
import { changeKeepingMatrixValid } from './matrix-guard';
import { cellInvalid } from '../matrix/matrix-problems';
import { writeTransaction } from '../matrix/write-transaction';
import { readCell, writeCellIfVersion, type CellState } from './working-matrix-store';

export interface CurationDeps {
  sequelize: Sequelize;
  models: MatrixModels & EditionModels;
}

export interface CellChange {
  value: Cell;
  /** the version the curator read; 0 for a cell never written */
  version: number;
  reason: string;
}

async function assertCellExists(models: MatrixModels & EditionModels, taxonId: string, traitCode: string): Promise<void> {
  const [taxon, trait] = await Promise.all([models.Taxon.findByPk(taxonId), models.Trait.findByPk(traitCode)]);
  if (!taxon || taxon.retired) throw problems.notFound(`There is no taxon "${taxonId}" in the working matrix.`);
  if (!trait || trait.retired) throw problems.notFound(`There is no trait "${traitCode}" in the working matrix.`);
}

/** One cell of the working matrix with its version, for editing. */
async function getCell(deps: CurationDeps, taxonId: string, traitCode: string): Promise<CellState> {
  await assertCellExists(deps.models, taxonId, traitCode);
  return readCell(deps.models, taxonId, traitCode);
}

/**
 * Sets one cell. The curator names the version they read; if someone else saved in between, nothing
 * is written and the answer is 409 with the cell as it is now. The new value must fit the trait.
 */
async function setCell(deps: CurationDeps, actor: Actor, taxonId: string, traitCode: string, change: CellChange): Promise<CellState> {
  await assertCellExists(deps.models, taxonId, traitCode);
  return writeTransaction(deps.sequelize, async (transaction) => {
    const before = await readCell(deps.models, taxonId, traitCode, transaction);
    const what = `The cell ${taxonId} × ${traitCode}`;
    const version = await changeKeepingMatrixValid(
      deps.models,
      transaction,
      what,
      () => writeCellIfVersion(deps.sequelize, deps.models, { taxonId, traitCode, value: change.value }, change.version, transaction),
      (introduced) => cellInvalid(what, change.value, introduced),
    );
    if (version === undefined) {
      const current = await readCell(deps.models, taxonId, traitCode, transaction);
      throw problems.conflict(
        `The cell ${taxonId} × ${traitCode} changed since version ${change.version}; it is now at version ${current.version}. Nothing was saved.`,
        { current: { value: current.value, version: current.version } },
      );
    }
    await recordAudit(
      deps.models,
      actor,
      [
        {
          entity: 'cell',
          entityKey: `${taxonId}/${traitCode}`,
          action: 'set',
          before: before.version === 0 ? null : before.value,
          after: change.value,
          reason: change.reason,
        },
      ],
      transaction,
    );
    return { taxonId, traitCode, value: change.value, version };
  });
}

/** Cells of the working matrix, read and written with optimistic locking. */
export function cellService(deps: CurationDeps) {
  return {
    get: getCell.bind(null, deps),
    set: setCell.bind(null, deps),
  };
}

export type CellService = ReturnType<typeof cellService>;
