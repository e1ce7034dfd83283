import { Router } from 'express';
import type { Sequelize } from 'sequelize';

/** True when the database answers a trivial query. */
async function isDatabaseReachable(sequelize: Sequelize): Promise<boolean> {
  try {
    await sequelize.query('SELECT 1');
    return true;
  } catch {
    return false;
  }
}

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
