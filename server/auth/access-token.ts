import { createSecretKey, type KeyObject } from 'node:crypto';
import jwt from 'jsonwebtoken';

/** Access tokens live 15 minutes; the client refreshes them before they lapse. */
export const ACCESS_TOKEN_TTL_S = 15 * 60;
/** The one algorithm we sign with and the only one we accept: no `none`, no RS/HS confusion. */
const ALGORITHM = 'HS256';
const ISSUER = 'holdline';

const keys = new Map<string, KeyObject>();
/**
 * The secret as a key object, made once: given a string, jsonwebtoken first tries to read it as a
 * public key and fails, which cost about 1.7 ms on every request and every socket handshake.
 */
function keyOf(secret: string): KeyObject {
  let key = keys.get(secret);
  if (!key) keys.set(secret, (key = createSecretKey(Buffer.from(secret, 'utf8'))));
  return key;
}

export interface AccessClaims {
  userId: string;
  /**
   * The sign-in this token belongs to: the refresh-token family's id. Every use checks that the
   * family is still live, so signing out or being deactivated ends the token at once rather than
   * when it lapses (and a reactivated person's old tokens stay dead).
   */
  sessionId: string;
  /** Expiry, seconds since the epoch. */
  exp: number;
}

/** Signs an access token for a person's session (the refresh-token family it was issued from). */
export function signAccessToken(session: { userId: string; sessionId: string }, secret: string, now: Date): { token: string; expiresAt: string } {
  const iat = Math.floor(now.getTime() / 1000);
  const exp = iat + ACCESS_TOKEN_TTL_S;
  const token = jwt.sign({ sub: session.userId, sid: session.sessionId, iat, exp, iss: ISSUER }, keyOf(secret), { algorithm: ALGORITHM });
  return { token, expiresAt: new Date(exp * 1000).toISOString() };
}

/** Verifies an access token with the algorithm pinned; null when invalid, expired or without a session. */
export function verifyAccessToken(token: string, secret: string, now: Date): AccessClaims | null {
  try {
    const payload = jwt.verify(token, keyOf(secret), {
      algorithms: [ALGORITHM],
      issuer: ISSUER,
      clockTimestamp: Math.floor(now.getTime() / 1000),
    });
    if (typeof payload !== 'object' || typeof payload.sub !== 'string' || typeof payload.exp !== 'number') return null;
    const sid: unknown = (payload as { sid?: unknown }).sid;
    // A token from before sessions were named cannot be ended by signing out: refused, the client refreshes.
    if (typeof sid !== 'string' || sid.length === 0) return null;
    return { userId: payload.sub, sessionId: sid, exp: payload.exp };
  } catch {
    return null;
  }
}
