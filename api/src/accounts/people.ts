import { Router, type RequestHandler } from 'express';
import type { Logger } from 'pino';
import type { Sequelize } from 'sequelize';
import type { AppConfig } from '../config';
import type { Models } from '../db/models';
import { authenticate } from '../auth/authenticate';
import { PrincipalCache } from '../auth/principal-cache';
import { startMailer, type Mailer } from '../mail/mailer';
import { devMailRoutes } from '../mail/dev-mail-routes';
import { createLimiterStores, createRateLimiters, type LimiterStores } from '../keys/rate-limits';
import { keyService, type KeyService } from '../keys/key-service';
import { adminKeyRoutes, keyRoutes } from '../keys/key-routes';
import { accountService, type AccountService } from './account-service';
import { accountRoutes } from './account-routes';
import { userAdminService } from '../admin/user-admin-service';
import { userAdminRoutes } from '../admin/user-admin-routes';
import { backupService } from '../admin/backup-service';
import { backupRoutes } from '../admin/backup-routes';
import { queryService } from '../queries/query-service';
import { queryRoutes } from '../queries/query-routes';

/** The accounts, keys, mail and limits side of the app, built once per app. */
export interface People {
  mailer: Mailer;
  limiterStores: LimiterStores;
  accounts: AccountService;
  keys: KeyService;
  /** authenticate, then the anonymous and per-key limits, then the key's usage count; mount before every route */
  gate: RequestHandler[];
  /** the tighter limit for anonymous bundle downloads; mount on the bundle route */
  anonymousBundleLimit: RequestHandler;
  /** routes mounted at /api/v1 */
  routes: Router;
  /** development-only routes mounted at /api/dev (undefined in production) */
  devRoutes: Router | undefined;
  close(): Promise<void>;
}

export interface PeopleDeps {
  config: AppConfig;
  logger: Logger;
  sequelize: Sequelize;
  models: Models;
  /** called after a backup was restored, so caches of the old data are dropped */
  afterRestore?: () => void;
}

export async function startPeople(deps: PeopleDeps): Promise<People> {
  const { config, logger, sequelize, models } = deps;
  const mailer = await startMailer(config.people, logger);
  const limiterStores = createLimiterStores(config.people, logger);
  const limiters = createRateLimiters(config.people, limiterStores);
  const accounts = accountService({ sequelize, models, config: config.people, mailer, logger });
  const keys = keyService(models, logger);
  const principals = new PrincipalCache().watch(models);

  const countKeyUse: RequestHandler = (req, _res, next) => {
    if (req.principal?.kind === 'key') keys.recordUse(req.principal.keyId);
    next();
  };

  const routes = Router();
  routes.use('/', accountRoutes(accounts, limiters.signIn));
  routes.use('/keys', keyRoutes(keys, limiters.partnerKeyQuota));
  routes.use('/admin/keys', adminKeyRoutes(keys));
  routes.use('/admin/users', userAdminRoutes(userAdminService(sequelize, models)));
  routes.use('/admin/backups', backupRoutes(backupService(sequelize, config.people.backupDir, () => {
    // a restore rewrites the tables directly, past the model hooks that keep the principal cache honest
    principals.clear();
    deps.afterRestore?.();
  })));
  routes.use('/queries', queryRoutes(queryService({ sequelize, models, mailer, logger, publicUrl: config.people.publicUrl })));

  let devRoutes: Router | undefined;
  if (config.env !== 'production' && mailer.captured) {
    devRoutes = Router();
    devRoutes.use('/mail', devMailRoutes(mailer));
  }

  return {
    mailer,
    limiterStores,
    accounts,
    keys,
    gate: [authenticate(models, principals), limiters.anonymous, ...limiters.partnerKey, countKeyUse],
    anonymousBundleLimit: limiters.anonymousBundle,
    routes,
    devRoutes,
    async close() {
      await keys.close();
      await mailer.close();
      await limiterStores.close();
    },
  };
}
