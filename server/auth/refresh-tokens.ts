import { randomUUID } from 'node:crypto';
import type { EntityManager } from 'typeorm';
import { statement } from '../db/statements.js';
import { RefreshToken } from '../entities/RefreshToken.js';
import { randomToken, sha256Hex, successorToken } from './hash.js';

/** A refresh token unused this long ends the session. */
export const REFRESH_IDLE_MS = 12 * 60 * 60 * 1000;
/** No session lasts longer than this, however active. */
export const REFRESH_ABSOLUTE_MS = 14 * 24 * 60 * 60 * 1000;
/** Two tabs refreshing together present the same token; within this window both get the same successor. */
export const REFRESH_GRACE_MS = 10_000;

export interface IssuedRefresh {
  token: string;
  userId: string;
  /** The family's id: the session every access token issued from it names (`sid`). */
  sessionId: string;
  /** When the cookie should expire: the idle limit, capped by the family's absolute limit. */
  cookieExpiresAt: Date;
}

export type RotateResult =
  | { ok: true; issued: IssuedRefresh }
  | { ok: false; reason: 'unknown' | 'revoked' | 'expired' | 'reused'; userId?: string };

function cookieExpiry(now: Date, familyExpiresAt: string): Date {
  return new Date(Math.min(now.getTime() + REFRESH_IDLE_MS, Date.parse(familyExpiresAt)));
}

/** Starts a new family at sign-in. */
export async function issueRefreshToken(manager: EntityManager, userId: string, now: Date): Promise<IssuedRefresh> {
  const token = randomToken();
  const familyExpiresAt = new Date(now.getTime() + REFRESH_ABSOLUTE_MS).toISOString();
  const familyId = randomUUID();
  await manager.insert(RefreshToken, {
    id: randomUUID(),
    familyId,
    userId,
    tokenHash: sha256Hex(token),
    createdAt: now.toISOString(),
    familyExpiresAt,
    rotatedAt: null,
    revokedAt: null,
  });
  return { token, userId, sessionId: familyId, cookieExpiresAt: cookieExpiry(now, familyExpiresAt) };
}

/**
 * Exchanges a refresh token for its successor. A token presented again within the grace period
 * returns the same successor; later, it is treated as stolen and the whole family is revoked.
 */
export async function rotateRefreshToken(manager: EntityManager, token: string, secret: string, now: Date): Promise<RotateResult> {
  const current = await manager.findOneBy(RefreshToken, { tokenHash: sha256Hex(token) });
  if (!current) return { ok: false, reason: 'unknown' };
  if (current.revokedAt) return { ok: false, reason: 'revoked', userId: current.userId };
  const nowMs = now.getTime();
  if (nowMs >= Date.parse(current.familyExpiresAt)) return { ok: false, reason: 'expired', userId: current.userId };

  const next = successorToken(token, secret);
  if (current.rotatedAt) {
    if (nowMs - Date.parse(current.rotatedAt) <= REFRESH_GRACE_MS) {
      return { ok: true, issued: { token: next, userId: current.userId, sessionId: current.familyId, cookieExpiresAt: cookieExpiry(now, current.familyExpiresAt) } };
    }
    await revokeFamily(manager, current.familyId, now);
    return { ok: false, reason: 'reused', userId: current.userId };
  }
  // The idle limit counts from the token's creation: each rotation makes a new token.
  if (nowMs - Date.parse(current.createdAt) >= REFRESH_IDLE_MS) return { ok: false, reason: 'expired', userId: current.userId };

  await manager.update(RefreshToken, { id: current.id }, { rotatedAt: now.toISOString() });
  await manager.insert(RefreshToken, {
    id: randomUUID(),
    familyId: current.familyId,
    userId: current.userId,
    tokenHash: sha256Hex(next),
    createdAt: now.toISOString(),
    familyExpiresAt: current.familyExpiresAt,
    rotatedAt: null,
    revokedAt: null,
  });
  return { ok: true, issued: { token: next, userId: current.userId, sessionId: current.familyId, cookieExpiresAt: cookieExpiry(now, current.familyExpiresAt) } };
}

/** Revokes the family a token belongs to (sign-out); the person and the session it ended, if any. */
export async function revokeByToken(manager: EntityManager, token: string, now: Date): Promise<{ userId: string; sessionId: string } | null> {
  const row = await manager.findOneBy(RefreshToken, { tokenHash: sha256Hex(token) });
  if (!row) return null;
  await revokeFamily(manager, row.familyId, now);
  return { userId: row.userId, sessionId: row.familyId };
}

/** Revokes a session by the id an access token names, when it is this person's and still live (sign-out with the access token alone). */
export async function revokeSession(manager: EntityManager, sessionId: string, userId: string, now: Date): Promise<{ userId: string; sessionId: string } | null> {
  const result = await manager
    .createQueryBuilder()
    .update(RefreshToken)
    .set({ revokedAt: now.toISOString() })
    .where('family_id = :sessionId AND user_id = :userId AND revoked_at IS NULL', { sessionId, userId })
    .execute();
  return (result.affected ?? 0) > 0 ? { userId, sessionId } : null;
}

/**
 * True while a session (a refresh-token family) of this person may still be used: not revoked
 * (sign-out, deactivation, a stolen token's reuse) and within its absolute limit. Every access
 * token is checked against it on every use.
 */
export async function sessionLive(manager: EntityManager, sessionId: string, userId: string, now: Date): Promise<boolean> {
  // Asked on every request, join and board command: a prepared statement (server/db/statements.ts).
  const row = statement(manager.connection, 'SELECT family_expires_at FROM refresh_token WHERE family_id = ? AND user_id = ? AND revoked_at IS NULL LIMIT 1').get(sessionId, userId) as
    | { family_expires_at: string }
    | undefined;
  return row !== undefined && now.getTime() < Date.parse(row.family_expires_at);
}

/** Ends every session of a person but one (a password set from an e-mailed link keeps the session it starts). */
export async function revokeOthersForUser(manager: EntityManager, userId: string, keepSessionId: string, now: Date): Promise<void> {
  await manager
    .createQueryBuilder()
    .update(RefreshToken)
    .set({ revokedAt: now.toISOString() })
    .where('user_id = :userId AND family_id <> :keepSessionId AND revoked_at IS NULL', { userId, keepSessionId })
    .execute();
}

/** Ends every session of a person (deactivation). */
export async function revokeAllForUser(manager: EntityManager, userId: string, now: Date): Promise<void> {
  await manager.createQueryBuilder().update(RefreshToken).set({ revokedAt: now.toISOString() }).where('user_id = :userId AND revoked_at IS NULL', { userId }).execute();
}

async function revokeFamily(manager: EntityManager, familyId: string, now: Date): Promise<void> {
  await manager.createQueryBuilder().update(RefreshToken).set({ revokedAt: now.toISOString() }).where('family_id = :familyId AND revoked_at IS NULL', { familyId }).execute();
}
