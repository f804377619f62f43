import { Router } from 'express';
import type { Sequelize } from 'sequelize';
import type { HealthResponse } from '../../contracts/health';
import { AppError } from '../../lib/errors';

const VERSION = process.env['npm_package_version'] ?? '0.1.0';

/** Open to anyone: is the API up, and can it reach its database? */
export function healthRouter(sequelize: Sequelize): Router {
  const router = Router();
  router.get('/', async (_req, res) => {
    const reachable = await Promise.race([
      sequelize.query('SELECT 1').then(() => true, () => false),
      new Promise<boolean>((resolve) => setTimeout(() => resolve(false), 2000).unref()),
    ]);
    if (!reachable) {
      throw new AppError(503, 'database-unreachable', 'The database cannot be reached', 'The API is running but cannot reach its database.', undefined, {
        database: 'unreachable',
      });
    }
    const body: HealthResponse = { status: 'ok', database: 'reachable', version: VERSION, time: new Date().toISOString() };
    res.set('Cache-Control', 'no-store').json(body);
  });
  return router;
}
