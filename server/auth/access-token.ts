import jwt from 'jsonwebtoken';

/** Access tokens live 15 minutes; the client refreshes them before they lapse. */
export const ACCESS_TOKEN_TTL_S = 15 * 60;
const ALGORITHM = 'HS256';
const ISSUER = 'holdline';

export interface AccessClaims {
  userId: string;
  /** Expiry, seconds since the epoch. */
  exp: number;
}

/** Signs an access token for a person. */
export function signAccessToken(userId: string, secret: string, now: Date): { token: string; expiresAt: string } {
  const iat = Math.floor(now.getTime() / 1000);
  const exp = iat + ACCESS_TOKEN_TTL_S;
  const token = jwt.sign({ sub: userId, iat, exp, iss: ISSUER }, secret, { algorithm: ALGORITHM });
  return { token, expiresAt: new Date(exp * 1000).toISOString() };
}

/** Verifies an access token with the algorithm pinned (no `none`, no RS/HS confusion); null when invalid. */
export function verifyAccessToken(token: string, secret: string, now: Date): AccessClaims | null {
  try {
    const payload = jwt.verify(token, secret, {
      algorithms: [ALGORITHM],
      issuer: ISSUER,
      clockTimestamp: Math.floor(now.getTime() / 1000),
    });
    if (typeof payload !== 'object' || typeof payload.sub !== 'string' || typeof payload.exp !== 'number') return null;
    return { userId: payload.sub, exp: payload.exp };
  } catch {
    return null;
  }
}
