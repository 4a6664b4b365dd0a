import { Router } from 'express';
import type { DataSource } from 'typeorm';
import type { Health } from '../../shared/schemas/health.js';
import type { WriteQueue } from '../db/write-queue.js';
import { HttpError } from '../errors.js';
import { authorize } from '../policies/index.js';

/**
 * GET /api/health: the process is up, the database answers, and writing works. A storage fault
 * (disk full, locked, read-only, I/O error) stands from a failed write until a write commits
 * again and answers 503 `faulted`; a server shutting down answers 503 `restarting`.
 */
export function healthRouter(dataSource: DataSource, version: string, queue: WriteQueue): Router {
  const router = Router();
  router.get('/health', async (req, res) => {
    authorize(req.actor ?? null, 'health.read');
    try {
      await dataSource.query('SELECT 1');
    } catch {
      throw new HttpError(503, 'database_unavailable', 'The database is not answering.');
    }
    const storage = queue.storage.status;
    const status: Health['status'] = !queue.isAccepting ? 'restarting' : storage.ok ? 'ok' : 'faulted';
    const body: Health = { status, version, database: 'ok', storage };
    res.setHeader('Cache-Control', 'no-store');
    res.status(status === 'ok' ? 200 : 503).json(body);
  });
  return router;
}
