import request from 'supertest';
import { io as connect, type Socket } from 'socket.io-client';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { linkInfoSchema, sessionSchema } from '../../../shared/schemas/auth.js';
import { signInAuditListSchema } from '../../../shared/schemas/audit.js';
import { userListSchema } from '../../../shared/schemas/users.js';
import { freshToken, signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

function linkTokenFrom(text: string, publicUrl: string): string {
  const match = new RegExp(`${publicUrl.replace(/[.:/]/g, '\\$&')}/set-password\\?token=([A-Za-z0-9_%-]+)`).exec(text);
  if (!match) throw new Error(`no link in e-mail:\n${text}`);
  return decodeURIComponent(match[1]);
}

describe('people, invitations and password resets', () => {
  let server: TestServer;
  let admin: SignedInUser;
  // Minted fresh at each call: several tests move the server's clock past the token's 15 minutes.
  const asAdmin = () => ({ Authorization: `Bearer ${freshToken(server, admin)}` });

  beforeAll(async () => {
    server = await startTestServer();
    admin = await signedInUser(server, { isAdmin: true, qualifications: [], email: 'office@example.test' });
  });
  afterAll(() => server.stop());

  it('invites a person by e-mail; the link from the fake mail server sets a password and signs them in', async () => {
    const invited = await request(server.app)
      .post('/api/users')
      .set(asAdmin())
      .send({ email: 'New.Rigger@Example.test', displayName: 'Jo Newell', qualifications: ['rigger', 'signaller'] })
      .expect(201);
    expect(invited.body.user).toMatchObject({ email: 'new.rigger@example.test', hasPassword: false, active: true, qualifications: ['rigger', 'signaller'] });

    const mail = await server.context.mailer.fake!.waitFor('new.rigger@example.test');
    expect(mail.subject).toBe('You are invited to Holdline');
    const token = linkTokenFrom(mail.text, server.config.publicUrl);

    const info = linkInfoSchema.parse((await request(server.app).get(`/api/auth/links/${token}`).expect(200)).body);
    expect(info).toMatchObject({ kind: 'invitation', email: 'new.rigger@example.test', displayName: 'Jo Newell' });
    expect(Date.parse(info.expiresAt) - Date.now()).toBeGreaterThan(71 * 3600 * 1000);

    const short = await request(server.app).post('/api/auth/set-password').send({ token, password: 'short' }).expect(400);
    expect(short.body.error.fields[0].path).toBe('password');

    const set = await request(server.app).post('/api/auth/set-password').send({ token, password: 'a-long-enough-password' }).expect(200);
    expect(sessionSchema.parse(set.body).user.hasPassword).toBe(true);
    expect(set.headers['set-cookie']).toBeDefined();

    await request(server.app).post('/api/auth/login').send({ email: 'new.rigger@example.test', password: 'a-long-enough-password' }).expect(200);

    const reused = await request(server.app).post('/api/auth/set-password').send({ token, password: 'another-long-password' }).expect(409);
    expect(reused.body.error).toMatchObject({ code: 'link_used', message: expect.stringMatching(/already been used.*new invitation/) });
  });

  it('resets a password through an e-mailed link valid for one hour; an expired link gives a clear error', async () => {
    const person = await signedInUser(server, { email: 'forgetful@example.test' });
    const accepted = await request(server.app).post('/api/auth/password-reset').send({ email: 'Forgetful@example.test' }).expect(202);
    const unknown = await request(server.app).post('/api/auth/password-reset').send({ email: 'nobody-here@example.test' }).expect(202);
    expect(unknown.body).toEqual(accepted.body);

    const mail = await server.context.mailer.fake!.waitFor('forgetful@example.test');
    expect(mail.subject).toBe('Reset your Holdline password');
    const token = linkTokenFrom(mail.text, server.config.publicUrl);
    const set = await request(server.app).post('/api/auth/set-password').send({ token, password: 'remembered-this-time' }).expect(200);
    expect(set.body.user.id).toBe(person.user.id);
    await request(server.app).post('/api/auth/login').send({ email: 'forgetful@example.test', password: 'remembered-this-time' }).expect(200);

    server.context.mailer.fake!.messages.length = 0;
    await request(server.app).post('/api/auth/password-reset').send({ email: 'forgetful@example.test' }).expect(202);
    const second = linkTokenFrom((await server.context.mailer.fake!.waitFor('forgetful@example.test')).text, server.config.publicUrl);
    server.advance(60 * 60 * 1000 + 1000);
    const expired = await request(server.app).post('/api/auth/set-password').send({ token: second, password: 'too-late-for-this' }).expect(410);
    expect(expired.body.error).toMatchObject({ code: 'link_expired', message: expect.stringMatching(/expired.*new reset link/) });
    expect((await request(server.app).get(`/api/auth/links/${second}`).expect(410)).body.error.code).toBe('link_expired');
    expect((await request(server.app).get('/api/auth/links/not-a-real-token-at-all').expect(404)).body.error.code).toBe('link_invalid');
  });

  it('an invitation link expires after 72 hours', async () => {
    await request(server.app).post('/api/users').set(asAdmin()).send({ email: 'late@example.test', displayName: 'Late Comer', qualifications: [] }).expect(201);
    const token = linkTokenFrom((await server.context.mailer.fake!.waitFor('late@example.test')).text, server.config.publicUrl);
    server.advance(72 * 60 * 60 * 1000 + 1000);
    await request(server.app).post('/api/auth/set-password').send({ token, password: 'finally-arrived' }).expect(410);
  });

  it('refuses a duplicate e-mail regardless of case, and names bad fields', async () => {
    const dup = await request(server.app).post('/api/users').set(asAdmin()).send({ email: 'OFFICE@example.test', displayName: 'Copy' }).expect(409);
    expect(dup.body.error.code).toBe('email_taken');
    const bad = await request(server.app).post('/api/users').set(asAdmin()).send({ email: 'nope', displayName: '', qualifications: ['crane-wizard'] }).expect(400);
    expect(bad.body.error.fields.map((f: { path: string }) => f.path).sort()).toEqual(['displayName', 'email', 'qualifications.0']);
  });

  it('lists and searches people, edits qualifications, and keeps the last admin', async () => {
    const list = userListSchema.parse((await request(server.app).get('/api/users?q=office').set(asAdmin()).expect(200)).body);
    expect(list.items.map((u) => u.email)).toEqual(['office@example.test']);

    const person = await signedInUser(server, { qualifications: ['rigger'] });
    const changed = await request(server.app).patch(`/api/users/${person.user.id}`).set(asAdmin()).send({ qualifications: ['rigger', 'operator'] }).expect(200);
    expect(changed.body.user.qualifications).toEqual(['rigger', 'operator']);
    await request(server.app).patch(`/api/users/${person.user.id}`).set(asAdmin()).send({ qualifications: ['pilot'] }).expect(400);
    await request(server.app).patch(`/api/users/${person.user.id}`).set(asAdmin()).send({}).expect(400);
    await request(server.app).patch('/api/users/00000000-0000-0000-0000-000000000000').set(asAdmin()).send({ active: false }).expect(404);

    expect((await request(server.app).patch(`/api/users/${admin.user.id}`).set(asAdmin()).send({ isAdmin: false }).expect(409)).body.error.code).toBe('last_admin');
    expect((await request(server.app).patch(`/api/users/${admin.user.id}`).set(asAdmin()).send({ active: false }).expect(409)).body.error.code).toBe('self_deactivate');
  });

  it('supervisors see crew candidates (active people, no e-mails); riggers do not', async () => {
    const sup = await signedInUser(server, { qualifications: ['supervisor'] });
    const res = await request(server.app).get('/api/crew-candidates').set({ Authorization: `Bearer ${sup.token}` }).expect(200);
    expect(res.body.items.length).toBeGreaterThan(1);
    expect(JSON.stringify(res.body)).not.toContain('@');
    const rig = await signedInUser(server, { qualifications: ['rigger'] });
    await request(server.app).get('/api/crew-candidates').set({ Authorization: `Bearer ${rig.token}` }).expect(403);
  });

  it('a non-admin is refused on every admin route with 403', async () => {
    const rigger = await signedInUser(server, { qualifications: ['rigger', 'supervisor'] });
    const auth = { Authorization: `Bearer ${rigger.token}` };
    await request(server.app).get('/api/users').set(auth).expect(403);
    await request(server.app).post('/api/users').set(auth).send({ email: 'x@example.test', displayName: 'X' }).expect(403);
    await request(server.app).patch(`/api/users/${admin.user.id}`).set(auth).send({ active: false }).expect(403);
    await request(server.app).get(`/api/users/${admin.user.id}`).set(auth).expect(403);
    await request(server.app).post(`/api/users/${admin.user.id}/invitation`).set(auth).expect(403);
    await request(server.app).get('/api/audit/sign-ins').set(auth).expect(403);
    await request(server.app).get('/api/dev/inbox').set(auth).expect(403);
    await request(server.app).get(`/api/users/${rigger.user.id}`).set(auth).expect(200);
  });

  it('deactivation signs the person out everywhere: HTTP, refresh and live sockets, with a reason', async () => {
    const person = await signedInUser(server, { qualifications: ['operator'] });
    const socket: Socket = connect(server.url, { transports: ['websocket'], auth: { token: person.token }, reconnection: false });
    await new Promise<void>((resolve, reject) => {
      socket.on('connect', () => resolve());
      socket.on('connect_error', reject);
    });
    const ended = new Promise<string>((resolve) => socket.on('session:ended', (p: { reason: string }) => resolve(p.reason)));
    const disconnected = new Promise<string>((resolve) => socket.on('disconnect', (reason) => resolve(reason)));

    await request(server.app).patch(`/api/users/${person.user.id}`).set(asAdmin()).send({ active: false }).expect(200);
    expect(await ended).toMatch(/deactivated/);
    expect(await disconnected).toBe('io server disconnect');

    await request(server.app).get('/api/auth/me').set('Authorization', `Bearer ${person.token}`).expect(401);
    await request(server.app).post('/api/auth/refresh').set('Cookie', person.cookie).expect(401);
    const again = connect(server.url, { transports: ['websocket'], auth: { token: person.token }, reconnection: false });
    const refusal = await new Promise<string>((resolve) => again.on('connect_error', (e) => resolve(e.message)));
    again.close();
    expect(refusal).toBe('account_inactive');

    const audit = signInAuditListSchema.parse((await request(server.app).get('/api/audit/sign-ins').set(asAdmin()).expect(200)).body);
    expect(audit.items.find((e) => e.kind === 'deactivated' && e.userId === person.user.id)?.displayName).toBe(person.user.displayName);
    expect(JSON.stringify(audit)).not.toMatch(/\$2[aby]\$|"(password|token|hash)[A-Za-z]*":/i);

    await request(server.app).patch(`/api/users/${person.user.id}`).set(asAdmin()).send({ active: true }).expect(200);
  });

  it('an expired access token closes its socket; a fresh token of the same session connects again', async () => {
    const person = await signedInUser(server, { qualifications: ['signaller'] });
    const socket = connect(server.url, { transports: ['websocket'], auth: { token: person.token }, reconnection: false });
    await new Promise<void>((resolve) => socket.on('connect', () => resolve()));
    const closed = new Promise<string>((resolve) => socket.on('disconnect', (reason) => resolve(reason)));
    server.advance(16 * 60 * 1000);
    // The server looks for lapsed tokens every second and closes their sockets (the client refreshes and reconnects).
    expect(await closed).toBe('io server disconnect');
    const fresh = await request(server.app).post('/api/auth/refresh').set('Cookie', person.cookie).expect(200);
    const again = connect(server.url, { transports: ['websocket'], auth: { token: fresh.body.token }, reconnection: false });
    await new Promise<void>((resolve, reject) => {
      again.on('connect', () => resolve());
      again.on('connect_error', reject);
    });
    expect(await again.emitWithAck('session:renew', { token: fresh.body.token })).toMatchObject({ ok: true });
    again.close();
  });
});
