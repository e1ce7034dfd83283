import { Router } from 'express';
import type { Sequelize } from 'sequelize';
import { isDatabaseReachable } from '../db/database';

export function healthRoutes(sequelize: Sequelize, version: string): Router {
  const router = Router();
  router.get('/', async (_req, res) => {
    const reachable = await isDatabaseReachable(sequelize);
    res
      .status(reachable ? 200 : 503)
      .set('Cache-Control', 'no-store')
      .json({ status: reachable ? 'ok' : 'degraded', version, database: reachable ? 'ok' : 'unreachable' });
  });
  return router;
}
