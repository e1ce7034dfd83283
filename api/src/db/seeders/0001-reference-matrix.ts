import { loadReferenceMatrix } from '../../../../seeds/load-matrix';
import { insertMatrixDocument } from '../../matrix/matrix-store';
import { snapshotWorkingMatrix } from '../../editions/edition-snapshot';
import type { Step } from '../step';

/** Loads the reference tree matrix from seeds/matrix into the working matrix and publishes edition 1. */
export const referenceMatrix: Step = {
  name: '0001-reference-matrix',
  async up({ context: { sequelize, models, config, logger } }) {
    const doc = loadReferenceMatrix(config.seedsDir);
    await sequelize.transaction((transaction) => insertMatrixDocument(models, doc, transaction));
    const edition = await snapshotWorkingMatrix(sequelize, models, { title: doc.title, region: doc.region, publishedBy: 'seed' });
    logger?.info({ edition: edition.number, taxa: doc.taxa.length, traits: doc.traits.length }, 'reference matrix seeded');
  },
  async down({ context: { sequelize, models } }) {
    await sequelize.transaction(async (transaction) => {
      await models.Edition.destroy({ where: {}, transaction });
      await models.InseparablePair.destroy({ where: {}, transaction });
      await models.Cell.destroy({ where: {}, transaction });
      await models.Taxon.destroy({ where: {}, transaction });
      await models.TraitValue.destroy({ where: {}, transaction });
      await models.Trait.destroy({ where: {}, transaction });
    });
  },
};
