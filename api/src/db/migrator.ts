import { Umzug, SequelizeStorage } from 'umzug';
import type { Sequelize } from 'sequelize';
import type { Logger } from 'pino';
import { migrations } from './migrations';
import { seeders } from './seeders';
import type { Models } from './models';
import type { MigrationContext, SeedConfig, Step } from './step';

function umzugFor(steps: readonly Step[], tableName: string, sequelize: Sequelize, models: Models, config: SeedConfig, logger?: Logger) {
  return new Umzug<MigrationContext>({
    migrations: steps.map((step) => ({ name: step.name, up: step.up, down: step.down })),
    context: { sequelize, queryInterface: sequelize.getQueryInterface(), models, config, logger },
    // Each storage needs its own model name, or the second silently shares the first's table.
    storage: new SequelizeStorage({ sequelize, tableName, modelName: tableName }),
    logger: logger ? { info: (m) => logger.info(m), warn: (m) => logger.warn(m), error: (m) => logger.error(m), debug: (m) => logger.debug(m) } : undefined,
  });
}

/** Schema migrations, tracked in `schema_migrations`. */
export function createMigrator(sequelize: Sequelize, models: Models, config: SeedConfig, logger?: Logger) {
  return umzugFor(migrations, 'schema_migrations', sequelize, models, config, logger);
}

/** Seeders (reference matrix, demo scenario), tracked separately in `seed_runs`. */
export function createSeeder(sequelize: Sequelize, models: Models, config: SeedConfig, logger?: Logger) {
  return umzugFor(seeders, 'seed_runs', sequelize, models, config, logger);
}

/** Brings the schema up to date, then runs the seeders this database has not had yet. */
export async function prepareDatabase(
  sequelize: Sequelize,
  models: Models,
  config: SeedConfig,
  logger?: Logger,
): Promise<{ migrated: string[]; seeded: string[] }> {
  const migrated = await createMigrator(sequelize, models, config, logger).up();
  const seeded = await createSeeder(sequelize, models, config, logger).up();
  return { migrated: migrated.map((m) => m.name), seeded: seeded.map((s) => s.name) };
}
