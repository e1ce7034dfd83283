import type { MigrationParams } from 'umzug';
import type { QueryInterface, Sequelize } from 'sequelize';
import type { Logger } from 'pino';
import type { ScryptParams } from '../auth/passwords';
import type { Models } from './models';

/** What the seeders need to know of the app's configuration (a part of AppConfig). */
export interface SeedConfig {
  /** the demo scenario is seeded outside production, and in production only when `demo.seed` is set */
  env: 'development' | 'test' | 'production';
  /** the demo accounts' passwords are hashed like every other */
  auth: { scrypt: ScryptParams };
  demo: {
    /** seed the demo scenario even in production */
    seed: boolean;
    /** the exact token the demo partner key gets, when set */
    partnerKey: string | undefined;
  };
  /** folder of the reference matrix (`seeds/` at the repo root) */
  seedsDir: string;
}

/**
 * What a migration or seeder receives. Migrations use only the query interface (models change over
 * time, a landed migration must not); seeders may use the current models and the configuration.
 */
export interface MigrationContext {
  sequelize: Sequelize;
  queryInterface: QueryInterface;
  models: Models;
  config: SeedConfig;
  logger?: Logger;
}

/** One schema change or seed step; `down` undoes `up`. */
export interface Step {
  name: string;
  up(params: MigrationParams<MigrationContext>): Promise<void>;
  down(params: MigrationParams<MigrationContext>): Promise<void>;
}
