import { Umzug, SequelizeStorage, type MigrationParams } from 'umzug';
import type { QueryInterface, Sequelize } from 'sequelize';
import type { Logger } from 'pino';
import { migrations } from './migrations';
import { seeders } from './seeders';

/** What a migration or seeder receives. */
export interface MigrationContext {
  sequelize: Sequelize;
  queryInterface: QueryInterface;
  logger?: Logger;
}

/** One schema change or seed step; `down` undoes `up`. */
export interface Step {
  name: string;
  up(params: MigrationParams<MigrationContext>): Promise<void>;
  down(params: MigrationParams<MigrationContext>): Promise<void>;
}

function umzugFor(steps: readonly Step[], tableName: string, sequelize: Sequelize, logger?: Logger) {
  return new Umzug<MigrationContext>({
    migrations: steps.map((step) => ({ name: step.name, up: step.up, down: step.down })),
    context: { sequelize, queryInterface: sequelize.getQueryInterface(), logger },
    storage: new SequelizeStorage({ sequelize, tableName }),
    logger: logger
      ? { info: (m) => logger.info(m), warn: (m) => logger.warn(m), error: (m) => logger.error(m), debug: (m) => logger.debug(m) }
      : undefined,
  });
}

/** Schema migrations, tracked in `schema_migrations`. */
export function createMigrator(sequelize: Sequelize, logger?: Logger) {
  return umzugFor(migrations, 'schema_migrations', sequelize, logger);
}

/** Seeders (reference matrix, demo scenario), tracked separately in `seed_runs`. */
export function createSeeder(sequelize: Sequelize, logger?: Logger) {
  return umzugFor(seeders, 'seed_runs', sequelize, logger);
}

/** Brings the schema up to date, then runs the seeders this database has not had yet. */
export async function prepareDatabase(sequelize: Sequelize, logger?: Logger): Promise<{ migrated: string[]; seeded: string[] }> {
  const migrated = await createMigrator(sequelize, logger).up();
  const seeded = await createSeeder(sequelize, logger).up();
  return { migrated: migrated.map((m) => m.name), seeded: seeded.map((s) => s.name) };
}
