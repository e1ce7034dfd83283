import type { Transaction } from 'sequelize';
import type { MatrixModels } from '../matrix/matrix-models';

/** The version of every written cell, keyed `taxonId/traitCode`; a cell missing here was never written (version 0). */
export async function readCellVersions(models: MatrixModels, transaction: Transaction): Promise<Map<string, number>> {
  const rows = await models.Cell.findAll({ attributes: ['taxonId', 'traitCode', 'version'], transaction });
  return new Map(rows.map((row) => [`${row.taxonId}/${row.traitCode}`, row.version]));
}
