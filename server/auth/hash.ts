import { createHash, createHmac, randomBytes } from 'node:crypto';

/** A random URL-safe token for refresh cookies and e-mailed links. */
export function randomToken(): string {
  return randomBytes(32).toString('base64url');
}

/** What the database keeps instead of a token. */
export function sha256Hex(value: string): string {
  return createHash('sha256').update(value).digest('hex');
}

/** Derives a token's successor, so a repeated rotation within the grace period yields the same one. */
export function successorToken(token: string, secret: string): string {
  return createHmac('sha256', secret).update(`refresh-successor:${token}`).digest('base64url');
}
