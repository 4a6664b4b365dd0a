import { createHmac, timingSafeEqual } from 'node:crypto';

/**
 * Signed photo URLs.
 *
 * `<img src>` cannot send `Authorization: Bearer`, so the URLs a presenter hands out carry
 * `?exp=<seconds since epoch>&sig=<HMAC-SHA256(secret, purpose, id, exp)>`. GET /api/uploads/:id
 * then admits EITHER a bearer token whose person passes `canSeeUpload`, OR an unexpired valid
 * signature. A signature is only minted inside a presenter, i.e. for a person the route serving
 * that presenter already allowed to see the photo's owner; holding the URL is the capability,
 * like a short-lived download link, and it stops working 12 to 13 hours later.
 * The id is signed, not the variant, so one signature serves both the photo and its thumbnail.
 */
export const UPLOAD_URL_TTL_S = 12 * 60 * 60;

// Expiries are rounded up to the hour so the same photo keeps the same URL for up to an hour of
// list refreshes, and the browser's cache is not defeated by a new query string every time.
const ROUND_S = 60 * 60;
// Domain separation: this HMAC can never be confused with another use of the same secret.
const PURPOSE = 'holdline:upload-url:v1';

function signature(secret: string, uploadId: string, exp: number): Buffer {
  return createHmac('sha256', secret).update(`${PURPOSE}\n${uploadId}\n${exp}`).digest();
}

/** The `exp` and `sig` query parameters for a photo, valid from `now` for at least 12 hours. */
export function signUploadUrl(uploadId: string, secret: string, now: Date): { exp: number; sig: string } {
  const exp = Math.ceil((Math.floor(now.getTime() / 1000) + UPLOAD_URL_TTL_S) / ROUND_S) * ROUND_S;
  return { exp, sig: signature(secret, uploadId, exp).toString('base64url') };
}

/** Why a signed URL was refused, or 'ok'. */
export type UploadUrlCheck = 'ok' | 'invalid' | 'expired';

/** Checks `exp` and `sig` from a query string against the photo id, in constant time. */
export function checkUploadUrl(uploadId: string, exp: string, sig: string, secret: string, now: Date): UploadUrlCheck {
  if (!/^\d{1,12}$/.test(exp) || !/^[A-Za-z0-9_-]{43}$/.test(sig)) return 'invalid';
  // Compared as text: base64url decoding is lenient about the last character's spare bits.
  const expected = Buffer.from(signature(secret, uploadId, Number(exp)).toString('base64url'));
  const given = Buffer.from(sig);
  if (given.length !== expected.length || !timingSafeEqual(given, expected)) return 'invalid';
  // Checked after the signature, so an attacker learns nothing from changing `exp` alone.
  return Number(exp) * 1000 > now.getTime() ? 'ok' : 'expired';
}
