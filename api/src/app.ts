import express, { type Express, type RequestHandler } from 'express';
import helmet from 'helmet';
import { pino, type Logger } from 'pino';
import { pinoHttp } from 'pino-http';
import type { Sequelize } from 'sequelize';
import type { AppConfig } from './config';
import { openDatabase } from './db/database';
import { defineModels, type Models } from './db/models';
import { prepareDatabase } from './db/migrator';
import { apiNotFound, problemErrorHandler } from './http/error-handler';
import { contractValidation, type ContractViolation } from './http/openapi-validation';
import { dynamicCompression } from './http/compression';
import { healthRoutes } from './health/health-routes';
import { docsRoutes } from './docs/docs-routes';
import { loadOpenApiDocument } from './docs/openapi-document';
import { siteRoutes } from './site/site-routes';
import { openToAnonymousButKeysNeed } from './auth/lookup-access';
import { accessBeforeValidation } from './auth/contract-access';
import { authenticate } from './gate/authenticate';
import { partnerCors } from './gate/cors';
import { KeyOriginsCache } from './gate/key-origins-cache';
import { PrincipalCache } from './gate/principal-cache';
import { createLimiterStores, createRateLimiters, type LimiterStores } from './gate/rate-limits';
import { startMailer, type Mailer } from './mail/mailer';
import { devMailRoutes } from './mail/dev-mail-routes';
import { sessionService } from './accounts/session-service';
import { oneTimeLinkService } from './accounts/one-time-link-service';
import { accountRoutes } from './accounts/account-routes';
import { keyService, type KeyService } from './keys/key-service';
import { adminKeyRoutes, keyRoutes } from './keys/key-routes';
import { userAdminService } from './admin/user-admin-service';
import { userAdminRoutes } from './admin/user-admin-routes';
import { backupService } from './admin/backup-service';
import { backupRoutes } from './admin/backup-routes';
import { queryService } from './queries/query-service';
import { queryRoutes } from './queries/query-routes';
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
import { idempotentCreation } from './idempotency/idempotent-creation';

/** The long-lived parts of one app, built once by createApp; each route module gets only what it needs. */
export interface AppContext {
  config: AppConfig;
  logger: Logger;
  sequelize: Sequelize;
  models: Models;
  /** the published editions, compiled once each; call `editions.invalidate()` after replacing them */
  editions: EditionCatalog;
  mailer: Mailer;
  /** where the rate-limit counters live (memory or Redis) */
  limiterStores: LimiterStores;
  /** partner keys, with their buffered usage counts */
  keys: KeyService;
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
  const sequelize = await openDatabase(config.database.url, logger);
  const models = defineModels(sequelize);
  if (config.database.migrateOnStart) {
    const { migrated, seeded } = await prepareDatabase(sequelize, models, config, logger);
    if (migrated.length > 0) logger.info({ migrated }, 'database migrated');
    if (seeded.length > 0) logger.info({ seeded }, 'database seeded');
  }
  const editions = new EditionCatalog(models);
  const mailer = await startMailer(config.mail, logger);
  const limiterStores = createLimiterStores(config.limits, logger);
  const limiters = createRateLimiters(config.limits, limiterStores);
  const keys = keyService(models, logger);
  const principals = new PrincipalCache().watch(models);
  const context: AppContext = { config, logger, sequelize, models, editions, mailer, limiterStores, keys };
  const identifyPool = config.identify.workers > 0 ? new IdentifyPool(config.identify.workers) : undefined;

  const sessions = sessionService({ models, config: config.auth, logger });
  const links = oneTimeLinkService({ sequelize, models, config: config.auth, publicUrl: config.mail.publicUrl, mailer, sessions });
  const backups = backupService(sequelize, config.storage.backupDir, () => {
    // a restore rewrites the tables directly, past the model hooks that keep the principal cache honest
    principals.clear();
    editions.invalidate();
  });
  const countKeyUse: RequestHandler = (req, _res, next) => {
    if (req.principal?.kind === 'key') keys.recordUse(req.principal.keyId);
    next();
  };
  const document = loadOpenApiDocument(config.contract.openApiFile);
  const cors = partnerCors(document, new KeyOriginsCache(models));

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
  // The gate: CORS preflights, who is calling (and whether their key allows the page's origin), then
  // the anonymous and per-key limits, then the key's usage count.
  app.use('/api/v1', cors.beforeAuth, authenticate(models, principals), cors.afterAuth, limiters.anonymous, ...limiters.partnerKey, countKeyUse);
  app.use('/api/v1/editions/current/bundle', limiters.anonymousBundle);
  const contract = contractValidation(document, { validateResponses: config.contract.validateResponses, beforeBodyValidation: accessBeforeValidation });
  app.use(contract.middleware);
  // the POSTs that create things answer a repeated Idempotency-Key with their first answer
  app.post(['/api/v1/keys', '/api/v1/editions', '/api/v1/queries', '/api/v1/study-sets', '/api/v1/curation/imports'], idempotentCreation(models, logger));

  app.use('/api/health', healthRoutes(sequelize, config.version));
  app.use('/api', docsRoutes(document));
  const lookup = openToAnonymousButKeysNeed('lookup');
  app.use('/api/v1/identify', identifyRoutes(editions, { pool: identifyPool, validateResponses: config.contract.validateResponses }));
  const photos = photoRoutes({ models, uploadsDir: config.storage.uploadsDir });
  app.use('/api/v1/taxa', photos.upload);
  app.use('/api/v1/taxa', lookup, taxaRoutes({ models, editions }));
  app.use('/api/v1/photos', lookup, photos.serve);
  app.use('/api/v1/traits', lookup, traitsRoutes(editions));
  app.use('/api/v1/compare', lookup, compareRoutes(editions));
  app.use('/api/v1/editions', editionRoutes({ sequelize, models, editions }));
  app.use('/api/v1/curation/imports', importRoutes({ sequelize, models }));
  app.use('/api/v1/curation', curationRoutes({ sequelize, models, editions }));
  app.use('/api/v1/study-sets', studyRoutes({ sequelize, models }));
  app.use('/api/v1', accountRoutes({ sessions, links }, limiters.signIn));
  app.use('/api/v1/keys', keyRoutes(keys, limiters.partnerKeyQuota));
  app.use('/api/v1/admin/keys', adminKeyRoutes(keys));
  app.use('/api/v1/admin/users', userAdminRoutes(userAdminService(sequelize, models)));
  app.use('/api/v1/admin/backups', backupRoutes(backups));
  app.use('/api/v1/queries', queryRoutes(queryService({ sequelize, models, mailer, logger, publicUrl: config.mail.publicUrl })));
  if (config.env !== 'production' && mailer.captured) app.use('/api/dev/mail', devMailRoutes(mailer));
  app.use('/api', apiNotFound);
  app.use(siteRoutes(config.site.webRoot));
  app.use(problemErrorHandler);

  return {
    app,
    context,
    contractViolations: contract.violations,
    close: async () => {
      await identifyPool?.close();
      await keys.close();
      await mailer.close();
      await limiterStores.close();
      await sequelize.close();
    },
  };
}
