import type { Sequelize } from 'sequelize';
import { defineMatrixModels } from '../matrix/matrix-models';
import { defineEditionModels } from '../editions/edition-models';
import { definePhotoModels } from '../uploads/photo-models';
import { defineAccountModels } from '../accounts/account-models';
import { defineKeyModels } from '../keys/key-models';
import { defineQueryModels } from '../queries/query-models';
import { defineStudyModels } from '../study/study-models';
import { defineIdempotencyModels } from '../idempotency/idempotency-models';

/**
 * Every model of one database. Model classes are defined per Sequelize instance (a factory, not
 * module-level classes) so several apps — each test's in-memory database — can live in one process.
 * Each feature defines its own models beside it; this only assembles them, so db/ imports the
 * features and no feature imports db/ (a feature names the narrow model type it needs, e.g. `MatrixModels`).
 */
export function defineModels(sequelize: Sequelize) {
  return {
    ...defineMatrixModels(sequelize),
    ...defineEditionModels(sequelize),
    ...definePhotoModels(sequelize),
    ...defineAccountModels(sequelize),
    ...defineKeyModels(sequelize),
    ...defineQueryModels(sequelize),
    ...defineStudyModels(sequelize),
    ...defineIdempotencyModels(sequelize),
  };
}

export type Models = ReturnType<typeof defineModels>;
