import { Router } from 'express';
import { z } from 'zod';
import type { SignInAuditEntry } from '../../shared/schemas/audit.js';
import type { AppContext } from '../context.js';
import { SignInAudit } from '../entities/SignInAudit.js';
import { User } from '../entities/User.js';
import { parseOrThrow } from '../errors.js';
import { authorize } from '../policies/index.js';

const auditQuerySchema = z.object({ limit: z.coerce.number().int().min(1).max(1000).default(200) });

/** The sign-in audit (the test inbox is in routes/mail.ts). */
export function auditRouter(context: AppContext): Router {
  const router = Router();
  const { manager } = context.dataSource;

  router.get('/audit/sign-ins', async (req, res) => {
    authorize(req.actor ?? null, 'audit.read', {}, req.authProblem);
    const { limit } = parseOrThrow(auditQuerySchema, req.query, 'query');
    const rows = await manager.find(SignInAudit, { order: { id: 'DESC' }, take: limit });
    const ids = [...new Set(rows.map((r) => r.userId).filter((id): id is string => id !== null))];
    const names = new Map((ids.length ? await manager.createQueryBuilder(User, 'u').where('u.id IN (:...ids)', { ids }).getMany() : []).map((u) => [u.id, u.displayName]));
    const items: SignInAuditEntry[] = rows.map((r) => ({ ...r, displayName: r.userId ? (names.get(r.userId) ?? null) : null }));
    res.json({ items });
  });

  return router;
}
