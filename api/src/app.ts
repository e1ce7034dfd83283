import express, { type Express } from 'express';
import helmet from 'helmet';
import { pino, type Logger } from 'pino';
import { pinoHttp } from 'pino-http';
import type { Sequelize } from 'sequelize';
import type { AppConfig } from './config';
import { openDatabase } from './db/database';
import { defineModels, type Models } from './db/models';
import { prepareDatabase } from './db/migrator';
import { apiNotFound, problemErrorHandler } from './http/error-handler';
import { dynamicCompression } from './http/compression';
import { healthRoutes } from './health/health-routes';
import { docsRoutes } from './docs/docs-routes';
import { webRoutes } from './web/web-routes';
import { startPeople, type People } from './accounts/people';
import { registerSeedConfig } from './db/seeders/0002-demo-scenario';
import { loadOpenApiDocument } from './docs/openapi-document';
import { contractValidation, type ContractViolation } from './http/openapi-validation';
import { openToAnonymousButKeysNeed } from './http/lookup-access';
import { EditionCatalog } from './editions/edition-catalog';
import { editionRoutes } from './editions/edition-routes';
import { identifyRoutes } from './identify/identify-routes';
import { IdentifyPool } from './identify/identify-pool';
import { taxaRoutes } from './taxa/taxa-routes';
import { traitsRoutes } from './traits/traits-routes';
import { curationRoutes } from './curation/curation-routes';
import { photoRoutes } from './uploads/photo-routes';
import { importRoutes } from './imports/import-routes';
import { compareRoutes } from './compare/compare-routes';
import { studyRoutes } from './study/study-routes';

/** Everything a route's domain service may need, built once per app. */
export interface AppContext {
  config: AppConfig;
  logger: Logger;
  sequelize: Sequelize;
  models: Models;
  /** the published editions, compiled once each; call `editions.invalidate()` after replacing them */
  editions: EditionCatalog;
  /** accounts, sessions, partner keys, rate limits and mail */
  people: People;
}

export interface CreatedApp {
  app: Express;
  context: AppContext;
  /** JSON responses that broke openapi.yaml (recorded when config.validateResponses is on) */
  contractViolations: ContractViolation[];
  /** closes the database; call after the HTTP server has stopped */
  close(): Promise<void>;
}

/** Builds the Express app and its database; listening is left to the caller (server.ts or a test). */
export async function createApp(config: AppConfig): Promise<CreatedApp> {
  const logger = pino({ level: config.logLevel, base: { app: 'sylvasift' } });
  const sequelize = await openDatabase(config.databaseUrl, logger);
  const models = defineModels(sequelize);
  registerSeedConfig(sequelize, config);
  if (config.migrateOnStart) {
    const { migrated, seeded } = await prepareDatabase(sequelize, models, logger);
    if (migrated.length > 0) logger.info({ migrated }, 'database migrated');
    if (seeded.length > 0) logger.info({ seeded }, 'database seeded');
  }
  const people = await startPeople({ config, logger, sequelize, models, afterRestore: () => context.editions.invalidate() });
  const context: AppContext = { config, logger, sequelize, models, editions: new EditionCatalog(models), people };
  const identifyPool = config.identifyWorkers > 0 ? new IdentifyPool(config.identifyWorkers) : undefined;

  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', 'loopback');
  app.set('etag', 'strong');
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          // Angular and Material add component styles at run time; scripts stay same-origin only.
          'style-src': ["'self'", "'unsafe-inline'"],
          'img-src': ["'self'", 'data:', 'blob:'],
          'connect-src': ["'self'"],
          'worker-src': ["'self'"],
          'manifest-src': ["'self'"],
          // The app is often served over plain http on localhost or a field laptop.
          'upgrade-insecure-requests': null,
        },
      },
    }),
  );
  app.use(
    pinoHttp({
      logger,
      autoLogging: { ignore: (req) => req.url === '/api/health' },
      serializers: {
        req: (req: { method: string; url: string }) => ({ method: req.method, url: req.url }),
        res: (res: { statusCode: number }) => ({ status: res.statusCode }),
      },
    }),
  );
  app.use(dynamicCompression());
  app.use(express.json({ limit: '256kb' }));
  app.use('/api/v1', people.gate);
  app.use('/api/v1/editions/current/bundle', people.anonymousBundleLimit);
  const contract = contractValidation(loadOpenApiDocument(), { validateResponses: config.validateResponses });
  app.use(contract.middleware);

  app.use('/api/health', healthRoutes(sequelize, config.version));
  app.use('/api', docsRoutes());
  const lookup = openToAnonymousButKeysNeed('lookup');
  app.use('/api/v1/identify', identifyRoutes(context.editions, { pool: identifyPool, validateResponses: config.validateResponses }));
  const photos = photoRoutes({ models, uploadsDir: config.uploadsDir });
  app.use('/api/v1/taxa', photos.upload);
  app.use('/api/v1/taxa', lookup, taxaRoutes(context));
  app.use('/api/v1/photos', lookup, photos.serve);
  app.use('/api/v1/traits', lookup, traitsRoutes(context.editions));
  app.use('/api/v1/compare', lookup, compareRoutes(context.editions));
  app.use('/api/v1/editions', editionRoutes(context));
  app.use('/api/v1/curation/imports', importRoutes(context));
  app.use('/api/v1/curation', curationRoutes(context));
  app.use('/api/v1/study-sets', studyRoutes(context));
  app.use('/api/v1', people.routes);
  if (people.devRoutes) app.use('/api/dev', people.devRoutes);
  app.use('/api', apiNotFound);
  app.use(webRoutes(config.webRoot));
  app.use(problemErrorHandler);

  return {
    app,
    context,
    contractViolations: contract.violations,
    close: async () => {
      await identifyPool?.close();
      await people.close();
      await sequelize.close();
    },
  };
}
