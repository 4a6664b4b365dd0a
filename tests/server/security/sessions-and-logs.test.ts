import jwt from 'jsonwebtoken';
import request from 'supertest';
import { connect, type Socket } from 'socket.io-client';
import { QueryFailedError } from 'typeorm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ClientToServerEvents, ServerToClientEvents } from '../../../shared/events/socket.js';
import { sessionSchema } from '../../../shared/schemas/auth.js';
import { TEST_PASSWORD } from '../../helpers/factories.js';
import { freshToken, refreshCookieOf, sessionIdOf, signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { BoardClient, httpCommand, signedInCrew, type CrewByRole } from '../../helpers/board.js';
import { addParts18m, seedModelAndUnit } from '../../helpers/fleet.js';
import { plannedJob } from '../../helpers/jobs.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

type ClientSocket = Socket<ServerToClientEvents, ClientToServerEvents>;

/**
 * Sessions end when they are ended, not when their access token lapses: signing out, being
 * deactivated (and reactivated) and a token's expiry, over HTTP, board commands and sockets.
 * The server's logs are captured throughout; the last but one test reads them for every
 * password, token and link the file used.
 */
describe('ending sessions, and what the logs keep of them', () => {
  let server: TestServer;
  const logLines: string[] = [];
  /** Every password, token, cookie and link token this file has handled. */
  const secrets = new Set<string>([TEST_PASSWORD]);
  const keep = <T extends { token: string; cookie?: string }>(who: T): T => {
    secrets.add(who.token);
    if (who.cookie) secrets.add(who.cookie.split('=')[1]);
    return who;
  };
  let crew: CrewByRole;
  let admin: SignedInUser;
  let jobId: string;
  const sockets: ClientSocket[] = [];

  const me = (token: string) => request(server.app).get('/api/auth/me').set('Authorization', `Bearer ${token}`);
  const asAdmin = () => ({ Authorization: `Bearer ${freshToken(server, admin)}` });
  /** A second sign-in of the same person (another tablet): its own session. */
  async function signInAgain(who: SignedInUser): Promise<SignedInUser> {
    const res = await request(server.app).post('/api/auth/login').send({ email: who.user.email, password: TEST_PASSWORD }).expect(200);
    return keep({ user: who.user, token: sessionSchema.parse(res.body).token, cookie: refreshCookieOf(res.headers['set-cookie']) });
  }
  function socketOf(token: string): ClientSocket {
    const s: ClientSocket = connect(server.url, { transports: ['websocket'], auth: { token }, reconnection: false, forceNew: true });
    sockets.push(s);
    return s;
  }
  const connected = (s: ClientSocket) =>
    new Promise<void>((resolve, reject) => {
      if (s.connected) return resolve();
      s.once('connect', () => resolve());
      s.once('connect_error', reject);
    });
  const handshakeRefusal = (s: ClientSocket) => new Promise<string>((resolve, reject) => {
    s.once('connect', () => reject(new Error('the handshake was accepted')));
    s.once('connect_error', (e) => resolve(e.message));
  });
  const disconnection = (s: ClientSocket) => new Promise<string>((resolve) => s.once('disconnect', (reason) => resolve(reason)));

  beforeAll(async () => {
    server = await startTestServer({ env: { LOG_LEVEL: 'trace' }, logStream: { write: (line: string) => void logLines.push(line) } });
    crew = await signedInCrew(server);
    for (const who of Object.values(crew)) keep(who);
    admin = keep(await signedInUser(server, { isAdmin: true, qualifications: [] }));
    secrets.add(server.context.secret);
    const { model, unit } = await seedModelAndUnit(server, admin.token);
    await addParts18m(server, admin.token, model.id, unit.id, 'S');
    const job = await plannedJob(server, crew, unit.id, 'Session job');
    await request(server.app).post(`/api/jobs/${job.id}/ready`).set({ Authorization: `Bearer ${crew.supervisor.token}` }).expect(200);
    expect((await httpCommand(server, crew.supervisor, job.id, { type: 'job.start' })).status).toBe(200);
    jobId = job.id;
  });
  afterAll(async () => {
    for (const s of sockets) s.close();
    await server.stop();
  });

  it('signs the access token out with the session: HTTP, board commands, new sockets, and the open socket is told and closed', async () => {
    const tablet = await signInAgain(crew.rigger);
    const office = await signInAgain(crew.rigger);
    const board = new BoardClient(server.url, tablet.token);
    sockets.push(board.socket as ClientSocket);
    expect((await board.join(jobId)).ok).toBe(true);
    const ended = new Promise<string>((resolve) => board.socket.once('session:ended', ({ reason }) => resolve(reason)));
    const gone = disconnection(board.socket as ClientSocket);

    await request(server.app).post('/api/auth/logout').set('Cookie', tablet.cookie).expect(204);

    expect(await ended).toMatch(/signed out/i);
    expect(await gone).toBe('io server disconnect');
    const refused = await me(tablet.token).expect(401);
    expect(refused.body.error).toMatchObject({ code: 'session_ended', message: 'Your session has ended. Sign in again.' });
    const command = await httpCommand(server, tablet, jobId, { type: 'weather.record', meanMs: 3, gustMs: 5, heightM: 10 });
    expect(command.status).toBe(401);
    expect(await handshakeRefusal(socketOf(tablet.token))).toBe('unauthenticated');

    // The same person's other sign-in goes on: only the session signed out has ended.
    await me(office.token).expect(200);
    const other = socketOf(office.token);
    await connected(other);
    expect(await other.emitWithAck('board:command', { jobId, command: { commandId: crypto.randomUUID(), type: 'weather.record', meanMs: 3, gustMs: 5, heightM: 10 } })).toMatchObject({ ok: true });
  });

  it('signs out with the access token alone (no refresh cookie): that session ends, its renewal too, the others go on', async () => {
    const tablet = await signInAgain(crew.operator);
    const office = await signInAgain(crew.operator);
    const board = new BoardClient(server.url, tablet.token);
    sockets.push(board.socket as ClientSocket);
    expect((await board.join(jobId)).ok).toBe(true);
    const gone = disconnection(board.socket as ClientSocket);

    await request(server.app).post('/api/auth/logout').set('Authorization', `Bearer ${tablet.token}`).expect(204);

    expect((await me(tablet.token).expect(401)).body.error.code).toBe('session_ended');
    expect(await gone).toBe('io server disconnect');
    // The session's refresh cookie, kept elsewhere, cannot bring it back.
    await request(server.app).post('/api/auth/refresh').set('Cookie', tablet.cookie).expect(401);
    await me(office.token).expect(200);
    // A token from nobody's session, or a forged one, ends nothing and is answered the same way.
    const forged = jwt.sign({ sub: crew.operator.user.id, sid: sessionIdOf(office.token), iss: 'holdline' }, 'not-the-secret', { algorithm: 'HS256', expiresIn: 900 });
    await request(server.app).post('/api/auth/logout').set('Authorization', `Bearer ${forged}`).expect(204);
    await me(office.token).expect(200);
  });

  it('refuses a token that names no session, and a renewal with another sign-in’s token', async () => {
    const bare = jwt.sign({ sub: crew.signaller.user.id, iss: 'holdline' }, server.context.secret, { algorithm: 'HS256', expiresIn: 900 });
    expect((await me(bare).expect(401)).body.error.code).toBe('token_invalid');

    const first = socketOf(freshToken(server, crew.signaller));
    await connected(first);
    const second = await signInAgain(crew.signaller);
    expect(await first.emitWithAck('session:renew', { token: second.token })).toMatchObject({ ok: false, error: { code: 'token_invalid' } });
  });

  it('a reactivated person’s old tokens stay dead: HTTP, refresh and sockets', async () => {
    const person = keep(await signedInUser(server, { qualifications: ['rigger'] }));
    await request(server.app).patch(`/api/users/${person.user.id}`).set(asAdmin()).send({ active: false }).expect(200);
    await request(server.app).patch(`/api/users/${person.user.id}`).set(asAdmin()).send({ active: true }).expect(200);

    expect((await me(person.token).expect(401)).body.error.code).toBe('session_ended');
    await request(server.app).post('/api/auth/refresh').set('Cookie', person.cookie).expect(401);
    expect(await handshakeRefusal(socketOf(person.token))).toBe('unauthenticated');
    // Signing in again starts a new session that works.
    const again = await signInAgain(person);
    await me(again.token).expect(200);
  });

  it('a password set from a reset link ends the person’s other sessions', async () => {
    const person = keep(await signedInUser(server, { qualifications: ['rigger'], email: 'reset.sessions@example.test' }));
    const s = socketOf(person.token);
    await connected(s);
    const ended = new Promise<string>((resolve) => s.once('session:ended', ({ reason }) => resolve(reason)));
    await request(server.app).post('/api/auth/password-reset').send({ email: person.user.email }).expect(202);
    const mail = await server.context.mailer.fake!.waitFor(person.user.email);
    const token = new URL(/https?:\/\/\S+/.exec(mail.text)![0]).searchParams.get('token')!;
    secrets.add(token).add('a-new-password-for-sure');
    await request(server.app).get(`/api/auth/links/${token}`).expect(200);
    const set = await request(server.app).post('/api/auth/set-password').send({ token, password: 'a-new-password-for-sure' }).expect(200);
    keep({ token: sessionSchema.parse(set.body).token, cookie: refreshCookieOf(set.headers['set-cookie']) });

    expect(await ended).toMatch(/password was changed/);
    await me(person.token).expect(401);
    await me(sessionSchema.parse(set.body).token).expect(200);
  });

  it('never logs a password, token, link or the secret, and answers an internal error without its SQL or stack', async () => {
    // Bad requests that carry a password: a malformed sign-in, broken JSON, a made-up link.
    await request(server.app).post('/api/auth/login').send({ email: 'not-an-email', password: 'password-in-a-bad-request' }).expect(400);
    await request(server.app).post('/api/auth/login').set('Content-Type', 'application/json').send('{"email":"a@example.test","password":"password-in-broken-json"').expect(400);
    await request(server.app).post('/api/auth/set-password').send({ token: 'made-up-link-token-made-up-link-token-0000', password: 'password-with-a-bad-link' }).expect(404);
    await request(server.app).get('/api/auth/links/made-up-link-token-in-the-path-0000000000').expect(404);
    for (const s of ['password-in-a-bad-request', 'password-in-broken-json', 'password-with-a-bad-link', 'made-up-link-token-made-up-link-token-0000', 'made-up-link-token-in-the-path-0000000000']) secrets.add(s);

    // An internal error: the database fails a query whose parameters hold something secret.
    const manager = server.context.dataSource.manager;
    const original = manager.findOneBy.bind(manager);
    manager.findOneBy = (() => {
      throw new QueryFailedError('SELECT "password_hash" FROM "user" WHERE "id" = ?', ['parameter-that-is-secret'], new Error('SQLITE_ERROR: no such column: password_hashh'));
    }) as typeof manager.findOneBy;
    let failed: request.Response;
    try {
      failed = await request(server.app).get(`/api/users/${admin.user.id}`).set('Authorization', `Bearer ${freshToken(server, admin)}`);
    } finally {
      manager.findOneBy = original;
    }
    secrets.add('parameter-that-is-secret');
    expect(failed.status).toBe(500);
    expect(failed.body).toEqual({ error: { code: 'internal', message: 'Something went wrong on the server. Try again; if it keeps happening, tell your administrator.' } });
    expect(failed.text).not.toMatch(/SELECT|SQLITE|password_hash|\bat \S+:\d+/);

    const log = logLines.join('');
    // The log did capture the work (so finding nothing in it means something): sign-ins, the board command, the error.
    expect(log).toContain('"url":"/api/auth/login"');
    expect(log).toContain('"url":"/api/auth/refresh"');
    expect(log).toContain(`"url":"/api/jobs/${jobId}/commands"`);
    expect(log).toContain('"url":"/api/auth/links/[redacted]"');
    expect(log).toContain('unhandled error');
    expect(log).toContain('no such column');
    const found = [...secrets].filter((secret) => log.includes(secret));
    expect(found).toEqual([]);
    expect(log).not.toMatch(/\$2[aby]\$\d\d\$/);
  });

  it('closes a socket whose token lapsed and refuses its join; a fresh token connects again', async () => {
    const person = await signInAgain(crew.operator);
    const s = socketOf(person.token);
    await connected(s);
    expect(await s.emitWithAck('board:join', { jobId })).toMatchObject({ ok: true });
    const gone = disconnection(s);
    server.advance(15 * 60 * 1000 + 1000);

    // Either the join is answered `token_expired` or the server has already closed the socket; it never succeeds.
    const join = await s
      .timeout(3000)
      .emitWithAck('board:join', { jobId })
      .catch(() => null);
    if (join) expect(join).toMatchObject({ ok: false, error: { code: 'token_expired' } });
    expect(await gone).toBe('io server disconnect');

    const refreshed = await request(server.app).post('/api/auth/refresh').set('Cookie', person.cookie).expect(200);
    const again = socketOf(sessionSchema.parse(refreshed.body).token);
    await connected(again);
    expect(await again.emitWithAck('board:join', { jobId })).toMatchObject({ ok: true });
  });
});
