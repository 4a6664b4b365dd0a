import type { Request, Response } from 'express';
import type { IssuedRefresh } from './refresh-tokens.js';

export const REFRESH_COOKIE = 'holdline_refresh';
const COOKIE_PATH = '/api/auth';

/** Sets the refresh token as an httpOnly, SameSite=Strict cookie scoped to the auth routes. */
export function setRefreshCookie(res: Response, issued: IssuedRefresh, secure: boolean): void {
  res.cookie(REFRESH_COOKIE, issued.token, {
    httpOnly: true,
    sameSite: 'strict',
    secure,
    path: COOKIE_PATH,
    expires: issued.cookieExpiresAt,
  });
}

export function clearRefreshCookie(res: Response, secure: boolean): void {
  res.clearCookie(REFRESH_COOKIE, { httpOnly: true, sameSite: 'strict', secure, path: COOKIE_PATH });
}

export function readRefreshCookie(req: Request): string | undefined {
  const value: unknown = req.cookies?.[REFRESH_COOKIE];
  return typeof value === 'string' && value.length > 0 ? value : undefined;
}
