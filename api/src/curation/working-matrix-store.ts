import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import type { Cell } from '@shared/engine';
import type { MatrixModels } from '../matrix/matrix-models';
import type { EditionModels } from '../editions/edition-models';

export interface CellState {
  taxonId: string;
  traitCode: string;
  value: Cell;
  /** 0 when the cell has never been written (it reads as unknown) */
  version: number;
}

export async function readCell(models: MatrixModels & EditionModels, taxonId: string, traitCode: string, transaction?: Transaction): Promise<CellState> {
  const row = await models.Cell.findOne({ where: { taxonId, traitCode }, transaction });
  return row ? { taxonId, traitCode, value: row.value, version: row.version } : { taxonId, traitCode, value: 'unknown', version: 0 };
}

/**
 * Writes a cell only if it is still at `expectedVersion` — one conditional UPDATE (or an INSERT for a
 * never-written cell, guarded by the unique index) — so two curators can never overwrite each other.
 * Returns the new version, or undefined when the cell had moved on.
 */
export async function writeCellIfVersion(
  sequelize: Sequelize,
  models: MatrixModels & EditionModels,
  cell: { taxonId: string; traitCode: string; value: Cell },
  expectedVersion: number,
  transaction: Transaction,
): Promise<number | undefined> {
  const now = new Date();
  if (expectedVersion === 0) {
    const [, inserted] = await models.Cell.findOrCreate({
      where: { taxonId: cell.taxonId, traitCode: cell.traitCode },
      defaults: { taxonId: cell.taxonId, traitCode: cell.traitCode, value: cell.value, version: 1 },
      transaction,
    });
    return inserted ? 1 : undefined;
  }
  const [, affected] = await sequelize.query(
    'UPDATE cells SET value = :value, version = version + 1, updated_at = :now WHERE taxon_id = :taxonId AND trait_code = :traitCode AND version = :expectedVersion',
    {
      replacements: { value: JSON.stringify(cell.value), now, taxonId: cell.taxonId, traitCode: cell.traitCode, expectedVersion },
      type: QueryTypes.UPDATE,
      transaction,
    },
  );
  return affected === 1 ? expectedVersion + 1 : undefined;
}

/** The version of every written cell, by taxon and trait. */
export async function readCellVersions(models: MatrixModels): Promise<Map<string, Record<string, number>>> {
  const rows = await models.Cell.findAll({ attributes: ['taxonId', 'traitCode', 'version'], raw: true });
  const versions = new Map<string, Record<string, number>>();
  for (const row of rows) {
    const ofTaxon = versions.get(row.taxonId) ?? {};
    ofTaxon[row.traitCode] = row.version;
    versions.set(row.taxonId, ofTaxon);
  }
  return versions;
}
