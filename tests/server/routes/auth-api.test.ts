import jwt from 'jsonwebtoken';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sessionSchema } from '../../../shared/schemas/auth.js';
import { SignInAudit } from '../../../server/entities/SignInAudit.js';
import { RefreshToken } from '../../../server/entities/RefreshToken.js';
import { User } from '../../../server/entities/User.js';
import { TEST_PASSWORD } from '../../helpers/factories.js';
import { refreshCookieOf, signedInUser } from '../../helpers/auth.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

describe('sign-in and sessions', () => {
  let server: TestServer;
  beforeAll(async () => {
    server = await startTestServer();
  });
  afterAll(() => server.stop());

  it('signs in with e-mail in any case and returns a 15-minute HS256 token, a user without secrets, and a strict httpOnly cookie', async () => {
    const { user } = await signedInUser(server, { email: 'Crane.Boss@Example.test', qualifications: ['supervisor'] });
    const res = await request(server.app).post('/api/auth/login').send({ email: 'CRANE.BOSS@example.TEST', password: TEST_PASSWORD }).expect(200);
    const session = sessionSchema.parse(res.body);
    expect(session.user).toMatchObject({ id: user.id, email: 'crane.boss@example.test', qualifications: ['supervisor'] });
    expect(JSON.stringify(res.body)).not.toMatch(/hash|\$2[aby]\$/);
    const decoded = jwt.decode(session.token, { complete: true });
    expect(decoded?.header.alg).toBe('HS256');
    const payload = decoded?.payload as { exp: number; iat: number; sub: string };
    expect(payload.exp - payload.iat).toBe(15 * 60);
    expect(payload.sub).toBe(user.id);
    const cookie = ([] as string[]).concat(res.headers['set-cookie'] ?? []).find((c) => c.startsWith('holdline_refresh='));
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Strict/i);
    expect(cookie).toMatch(/Path=\/api\/auth/);
    const me = await request(server.app).get('/api/auth/me').set('Authorization', `Bearer ${session.token}`).expect(200);
    expect(me.body.user.id).toBe(user.id);
  });

  it('gives the same 401 for a wrong password and an unknown e-mail, and audits both', async () => {
    const { user } = await signedInUser(server);
    const wrongPassword = await request(server.app).post('/api/auth/login').send({ email: user.email, password: 'not-the-password' }).expect(401);
    const unknownEmail = await request(server.app).post('/api/auth/login').send({ email: 'nobody@example.test', password: 'not-the-password' }).expect(401);
    expect(wrongPassword.body).toEqual(unknownEmail.body);
    expect(wrongPassword.body.error.code).toBe('bad_credentials');
    const failed = await server.context.dataSource.manager.findBy(SignInAudit, { kind: 'sign_in_failed' });
    expect(failed.map((f) => f.email)).toEqual(expect.arrayContaining([user.email, 'nobody@example.test']));
    expect(JSON.stringify(failed)).not.toContain('not-the-password');
  });

  it('names every failing field of a malformed sign-in', async () => {
    const res = await request(server.app).post('/api/auth/login').send({ email: 'not-an-email' }).expect(400);
    expect(res.body.error.fields.map((f: { path: string }) => f.path).sort()).toEqual(['email', 'password']);
  });

  it('rotates the refresh token; a repeat within 10 s gets the same successor; a repeat later revokes the family', async () => {
    const { cookie: first } = await signedInUser(server);
    const a = await request(server.app).post('/api/auth/refresh').set('Cookie', first).expect(200);
    const second = refreshCookieOf(a.headers['set-cookie']);
    expect(second).not.toBe(first);
    expect(sessionSchema.parse(a.body).token).toBeTruthy();

    server.advance(5_000);
    const b = await request(server.app).post('/api/auth/refresh').set('Cookie', first).expect(200);
    expect(refreshCookieOf(b.headers['set-cookie'])).toBe(second);

    const c = await request(server.app).post('/api/auth/refresh').set('Cookie', second).expect(200);
    const third = refreshCookieOf(c.headers['set-cookie']);

    server.advance(11_000);
    const reuse = await request(server.app).post('/api/auth/refresh').set('Cookie', first).expect(401);
    expect(reuse.body.error.code).toBe('session_ended');
    // The whole family is gone, including the newest token.
    await request(server.app).post('/api/auth/refresh').set('Cookie', third).expect(401);
    const audit = await server.context.dataSource.manager.findBy(SignInAudit, { kind: 'refresh_reuse' });
    expect(audit.length).toBeGreaterThan(0);
  });

  it('ends a refresh token unused for 12 hours and any session after 14 days', async () => {
    const idle = await signedInUser(server);
    server.advance(12 * 60 * 60 * 1000 + 1000);
    await request(server.app).post('/api/auth/refresh').set('Cookie', idle.cookie).expect(401);

    // Refreshing every 11 hours keeps a session alive until the 14-day limit (336 h): 30 refreshes
    // (330 h) succeed, the 31st (341 h) is refused.
    let { cookie } = await signedInUser(server);
    const statuses: number[] = [];
    for (let i = 1; i <= 31; i++) {
      server.advance(11 * 60 * 60 * 1000);
      const res = await request(server.app).post('/api/auth/refresh').set('Cookie', cookie);
      statuses.push(res.status);
      if (res.status === 200) cookie = refreshCookieOf(res.headers['set-cookie']);
    }
    expect(statuses.slice(0, 30).every((s) => s === 200)).toBe(true);
    expect(statuses[30]).toBe(401);
  });

  it('refuses a refresh without a cookie or with a made-up one', async () => {
    await request(server.app).post('/api/auth/refresh').expect(401);
    await request(server.app).post('/api/auth/refresh').set('Cookie', 'holdline_refresh=made-up').expect(401);
  });

  it('logout revokes the refresh token', async () => {
    const { cookie, user } = await signedInUser(server);
    await request(server.app).post('/api/auth/logout').set('Cookie', cookie).expect(204);
    await request(server.app).post('/api/auth/refresh').set('Cookie', cookie).expect(401);
    const rows = await server.context.dataSource.manager.findBy(RefreshToken, { userId: user.id });
    expect(rows.every((r) => r.revokedAt !== null)).toBe(true);
  });

  it('refuses expired, tampered, wrongly signed and alg:none access tokens', async () => {
    const { token, user } = await signedInUser(server);
    const me = (t: string) => request(server.app).get('/api/auth/me').set('Authorization', `Bearer ${t}`);
    await me(token).expect(200);

    const [h, p, s] = token.split('.');
    const payload = JSON.parse(Buffer.from(p, 'base64url').toString()) as Record<string, unknown>;
    const tampered = `${h}.${Buffer.from(JSON.stringify({ ...payload, sub: 'someone-else' })).toString('base64url')}.${s}`;
    expect((await me(tampered).expect(401)).body.error.code).toBe('token_invalid');

    const none = `${Buffer.from(JSON.stringify({ alg: 'none', typ: 'JWT' })).toString('base64url')}.${p}.`;
    await me(none).expect(401);

    const otherSecret = jwt.sign({ sub: user.id, iss: 'holdline' }, 'another-secret-another-secret-another-secret', { algorithm: 'HS256', expiresIn: 900 });
    await me(otherSecret).expect(401);

    const hs512 = jwt.sign({ sub: user.id, iss: 'holdline' }, server.context.secret, { algorithm: 'HS512', expiresIn: 900 });
    await me(hs512).expect(401);

    server.advance(15 * 60 * 1000 + 1000);
    await me(token).expect(401);
  });

  it('ten wrong passwords from ten addresses do not lock the person out: the right password from their own address signs in', async () => {
    const { user } = await signedInUser(server);
    for (let i = 0; i < 10; i++) {
      await request(server.app).post('/api/auth/login').set('X-Forwarded-For', `192.0.2.${i + 1}`).send({ email: user.email, password: `wrong-password-${i}` }).expect(401);
    }
    await request(server.app).post('/api/auth/login').set('X-Forwarded-For', '192.0.2.99').send({ email: user.email, password: TEST_PASSWORD }).expect(200);
  });

  it('refuses a deactivated person at sign-in, with an old access token and at refresh', async () => {
    const person = await signedInUser(server);
    await server.context.queue.transaction((m) => m.update(User, { id: person.user.id }, { active: false }));
    const login = await request(server.app).post('/api/auth/login').send({ email: person.user.email, password: TEST_PASSWORD }).expect(401);
    expect(login.body.error.code).toBe('account_inactive');
    // One answer to a deactivated account, whether it brings a password or a token.
    expect((await request(server.app).get('/api/auth/me').set('Authorization', `Bearer ${person.token}`).expect(401)).body).toEqual(login.body);
    await request(server.app).post('/api/auth/refresh').set('Cookie', person.cookie).expect(401);
  });
});
