import type { EntityManager } from 'typeorm';
import type { SignInAuditKind } from '../../shared/schemas/audit.js';
import { SignInAudit } from '../entities/SignInAudit.js';

export interface AuditEntry {
  kind: SignInAuditKind;
  email?: string | null;
  userId?: string | null;
  ip?: string | null;
  detail?: string | null;
}

/** Appends a line to the sign-in audit. */
export async function recordSignInAudit(manager: EntityManager, entry: AuditEntry, now: Date): Promise<void> {
  await manager.insert(SignInAudit, {
    at: now.toISOString(),
    kind: entry.kind,
    email: entry.email?.slice(0, 254) ?? null,
    userId: entry.userId ?? null,
    ip: entry.ip ?? null,
    detail: entry.detail?.slice(0, 300) ?? null,
  });
}
