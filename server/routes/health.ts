import { Router } from 'express';
import type { DataSource } from 'typeorm';
import type { Health } from '../../shared/schemas/health.js';
import { HttpError } from '../errors.js';
import { authorize } from '../policies/index.js';

/** GET /api/health: the process is up and the database answers. */
export function healthRouter(dataSource: DataSource, version: string): Router {
  const router = Router();
  router.get('/health', async (req, res) => {
    authorize(req.actor ?? null, 'health.read');
    try {
      await dataSource.query('SELECT 1');
    } catch {
      throw new HttpError(503, 'database_unavailable', 'The database is not answering.');
    }
    const body: Health = { status: 'ok', version, database: 'ok' };
    res.json(body);
  });
  return router;
}
