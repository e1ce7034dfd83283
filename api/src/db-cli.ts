/**
 * Database commands: `migrate` (schema up to date), `seed` (run pending seeders), `reset` (drop
 * everything, then migrate and seed). Uses DATABASE_URL like the server.
 */
import fs from 'node:fs';
import path from 'node:path';
import { pino } from 'pino';
import { loadConfig } from './config';
import { openDatabase } from './db/database';
import { createMigrator, createSeeder } from './db/migrator';
import { defineModels } from './db/models';

const USAGE = 'usage: tsx api/src/db-cli.ts migrate | seed | reset';

async function main(command: string | undefined): Promise<void> {
  if (command !== 'migrate' && command !== 'seed' && command !== 'reset') throw new Error(USAGE);
  const config = loadConfig();
  const logger = pino({ level: config.logLevel });

  if (command === 'reset' && config.database.url.startsWith('sqlite:') && !config.database.url.includes(':memory:')) {
    const file = path.resolve(config.database.url.slice('sqlite:'.length));
    for (const suffix of ['', '-wal', '-shm']) fs.rmSync(file + suffix, { force: true });
    console.log(`removed ${file}`);
  }
  const sequelize = await openDatabase(config.database.url, logger);
  const models = defineModels(sequelize);
  try {
    if (command === 'reset' && !config.database.url.startsWith('sqlite:')) {
      await createSeeder(sequelize, models, config, logger).down({ to: 0 });
      await createMigrator(sequelize, models, config, logger).down({ to: 0 });
    }
    if (command === 'migrate' || command === 'reset') {
      const done = await createMigrator(sequelize, models, config, logger).up();
      console.log(done.length ? `migrated: ${done.map((m) => m.name).join(', ')}` : 'schema already up to date');
    }
    if (command === 'seed' || command === 'reset') {
      const pending = await createMigrator(sequelize, models, config, logger).pending();
      if (pending.length > 0) throw new Error('run `npm run db:migrate` first: the schema is not up to date');
      const done = await createSeeder(sequelize, models, config, logger).up();
      console.log(done.length ? `seeded: ${done.map((s) => s.name).join(', ')}` : 'nothing new to seed');
    }
  } finally {
    await sequelize.close();
  }
}

main(process.argv[2]).catch((error: unknown) => {
  console.error(error instanceof Error ? error.message : error);
  process.exit(1);
});
