import { Umzug, SequelizeStorage, type MigrationParams } from 'umzug';
import type { QueryInterface, Sequelize } from 'sequelize';
import type { Logger } from 'pino';
import { migrations } from './migrations';
import { seeders } from './seeders';
import type { Models } from './models';

/**
 * What a migration or seeder receives. Migrations use only the query interface (models change over
 * time, a landed migration must not); seeders may use the current models.
 */
export interface MigrationContext {
  sequelize: Sequelize;
  queryInterface: QueryInterface;
  models: Models;
  logger?: Logger;
}

/** One schema change or seed step; `down` undoes `up`. */
export interface Step {
  name: string;
  up(params: MigrationParams<MigrationContext>): Promise<void>;
  down(params: MigrationParams<MigrationContext>): Promise<void>;
}

function umzugFor(steps: readonly Step[], tableName: string, sequelize: Sequelize, models: Models, logger?: Logger) {
  return new Umzug<MigrationContext>({
    migrations: steps.map((step) => ({ name: step.name, up: step.up, down: step.down })),
    context: { sequelize, queryInterface: sequelize.getQueryInterface(), models, logger },
    // Each storage needs its own model name, or the second silently shares the first's table.
    storage: new SequelizeStorage({ sequelize, tableName, modelName: tableName }),
    logger: logger
      ? { info: (m) => logger.info(m), warn: (m) => logger.warn(m), error: (m) => logger.error(m), debug: (m) => logger.debug(m) }
      : undefined,
  });
}

/** Schema migrations, tracked in `schema_migrations`. */
export function createMigrator(sequelize: Sequelize, models: Models, logger?: Logger) {
  return umzugFor(migrations, 'schema_migrations', sequelize, models, logger);
}

/** Seeders (reference matrix, demo scenario), tracked separately in `seed_runs`. */
export function createSeeder(sequelize: Sequelize, models: Models, logger?: Logger) {
  return umzugFor(seeders, 'seed_runs', sequelize, models, logger);
}

/** Brings the schema up to date, then runs the seeders this database has not had yet. */
export async function prepareDatabase(sequelize: Sequelize, models: Models, logger?: Logger): Promise<{ migrated: string[]; seeded: string[] }> {
  const migrated = await createMigrator(sequelize, models, logger).up();
  const seeded = await createSeeder(sequelize, models, logger).up();
  return { migrated: migrated.map((m) => m.name), seeded: seeded.map((s) => s.name) };
}
