import jwt from 'jsonwebtoken';
import request from 'supertest';
import { signAccessToken } from '../../server/auth/access-token.js';
import type { Qualification } from '../../shared/schemas/users.js';
import type { User } from '../../server/entities/User.js';
import { insertUser, TEST_PASSWORD } from './factories.js';
import type { TestServer } from './server.js';

export interface SignedInUser {
  user: User;
  token: string;
  /** The Set-Cookie value carrying the refresh token. */
  cookie: string;
}

/** Creates a person through the real command and signs them in through the real route. */
export async function signedInUser(server: TestServer, overrides: { qualifications?: Qualification[]; isAdmin?: boolean; email?: string } = {}): Promise<SignedInUser> {
  const user = await server.context.queue.transaction((m) => insertUser(m, overrides));
  const res = await request(server.app).post('/api/auth/login').send({ email: user.email, password: TEST_PASSWORD }).expect(200);
  return { user, token: res.body.token as string, cookie: refreshCookieOf(res.headers['set-cookie']) };
}

/** Extracts `holdline_refresh=...` from a Set-Cookie header. */
export function refreshCookieOf(setCookie: string | string[] | undefined): string {
  const list = Array.isArray(setCookie) ? setCookie : setCookie ? [setCookie] : [];
  const found = list.find((c) => c.startsWith('holdline_refresh='));
  if (!found) throw new Error('no refresh cookie set');
  return found.split(';')[0];
}

/**
 * A new access token of the same sign-in, at the server's clock now, as the client's refresh would
 * bring: for tests that move the clock past the token's 15 minutes. It names the same session, so
 * it stops working when that session ends.
 */
export function freshToken(server: TestServer, who: { user: { id: string }; token: string }): string {
  return signAccessToken({ userId: who.user.id, sessionId: sessionIdOf(who.token) }, server.context.secret, server.context.now()).token;
}

/** The sign-in (refresh-token family) an access token names. */
export function sessionIdOf(token: string): string {
  const sid = (jwt.decode(token) as { sid?: unknown } | null)?.sid;
  if (typeof sid !== 'string') throw new Error('that token names no session');
  return sid;
}
