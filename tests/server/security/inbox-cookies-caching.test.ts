import { readFileSync } from 'node:fs';
import path from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { inboxListSchema } from '../../../shared/schemas/audit.js';
import { sessionSchema } from '../../../shared/schemas/auth.js';
import { loadConfig, TEST_INBOX_FLAG } from '../../../server/config.js';
import { HIDDEN_LINK } from '../../../server/routes/mail.js';
import { TEST_PASSWORD } from '../../helpers/factories.js';
import { signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

/** The test inbox (off by default, others' links hidden), the refresh cookie's flags, and answers no cache keeps. */
describe('test inbox, cookies and caching', () => {
  let server: TestServer;
  let admin: SignedInUser;
  const asAdmin = () => ({ Authorization: `Bearer ${admin.token}` });
  const linkTokenIn = (text: string) => /[?&]token=([A-Za-z0-9_%-]+)/.exec(text)?.[1] ?? null;

  beforeAll(async () => {
    server = await startTestServer();
    admin = await signedInUser(server, { isAdmin: true, qualifications: [], email: 'office.admin@example.test' });
  });
  afterAll(() => server.stop());

  it('is off unless asked for: HOLDLINE_TEST_INBOX, else the flag npm start and npm run dev pass', async () => {
    expect(loadConfig({}, []).testInbox).toBe(false);
    expect(loadConfig({}, ['node', 'server/index.ts', TEST_INBOX_FLAG]).testInbox).toBe(true);
    expect(loadConfig({ HOLDLINE_TEST_INBOX: '0' }, [TEST_INBOX_FLAG]).testInbox).toBe(false);
    expect(loadConfig({ HOLDLINE_TEST_INBOX: '1' }, []).testInbox).toBe(true);
    const scripts = (JSON.parse(readFileSync(path.resolve(import.meta.dirname, '../../../package.json'), 'utf8')) as { scripts: Record<string, string> }).scripts;
    expect(scripts.start).toContain(`server/index.ts ${TEST_INBOX_FLAG}`);
    expect(scripts.dev).toContain(`server/index.ts ${TEST_INBOX_FLAG}`);
    expect(scripts.server).not.toContain(TEST_INBOX_FLAG);

    // With the default settings (the demo on, nothing said of the inbox) an admin finds no inbox.
    expect(loadConfig({}, []).demo).toBe(true);
    server.config.demo = true;
    try {
      expect(server.config.testInbox).toBe(false);
      await request(server.app).get('/api/dev/inbox').set(asAdmin()).expect(404);
    } finally {
      server.config.demo = false;
    }
  });

  it('shows an admin their own links whole and never another person’s reset link', async () => {
    server.config.testInbox = true;
    try {
      const person = await signedInUser(server, { qualifications: ['rigger'], email: 'someone.else@example.test' });
      await request(server.app).post('/api/auth/password-reset').send({ email: person.user.email }).expect(202);
      await request(server.app).post('/api/auth/password-reset').send({ email: admin.user.email }).expect(202);
      const theirs = await server.context.mailer.fake!.waitFor(person.user.email);
      const mine = await server.context.mailer.fake!.waitFor(admin.user.email);
      const realToken = linkTokenIn(theirs.text);
      expect(realToken).not.toBeNull();

      const items = inboxListSchema.parse((await request(server.app).get('/api/dev/inbox').set(asAdmin()).expect(200)).body).items;
      const shownTheirs = items.find((m) => m.id === theirs.id)!;
      const shownMine = items.find((m) => m.id === mine.id)!;
      expect(shownTheirs.text).toContain(HIDDEN_LINK);
      expect(shownTheirs.text).not.toContain(realToken!);
      expect(linkTokenIn(shownTheirs.text)).toBeNull();
      expect(shownMine.text).toBe(mine.text);
      // The rest of the message is still there to read.
      expect(shownTheirs.subject).toBe(theirs.subject);
    } finally {
      server.config.testInbox = false;
    }
  });

  it('sets the refresh cookie HttpOnly and SameSite=Strict, and Secure behind an https proxy or an https public address', async () => {
    const login = () => request(server.app).post('/api/auth/login').send({ email: admin.user.email, password: TEST_PASSWORD }).expect(200);
    const cookieOf = (res: request.Response) => ([] as string[]).concat(res.headers['set-cookie'] ?? []).find((c) => c.startsWith('holdline_refresh='))!;

    const plain = cookieOf(await login());
    expect(plain).toMatch(/HttpOnly/i);
    expect(plain).toMatch(/SameSite=Strict/i);
    expect(plain).not.toMatch(/Secure/i);

    // The app trusts the loopback proxy, so its X-Forwarded-Proto says the browser's side is https.
    const proxied = cookieOf(await request(server.app).post('/api/auth/login').set('X-Forwarded-Proto', 'https').send({ email: admin.user.email, password: TEST_PASSWORD }).expect(200));
    expect(proxied).toMatch(/;\s*Secure/i);
    expect(proxied).toMatch(/HttpOnly/i);

    const before = server.config.publicUrl;
    server.config.publicUrl = 'https://holdline.example.test';
    try {
      expect(cookieOf(await login())).toMatch(/;\s*Secure/i);
    } finally {
      server.config.publicUrl = before;
    }
  });

  it('answers that carry tokens or personal data say Cache-Control: no-store', async () => {
    const login = await request(server.app).post('/api/auth/login').send({ email: admin.user.email, password: TEST_PASSWORD }).expect(200);
    const token = sessionSchema.parse(login.body).token;
    const cookie = ([] as string[]).concat(login.headers['set-cookie'] ?? []).find((c) => c.startsWith('holdline_refresh='))!.split(';')[0];
    const auth = { Authorization: `Bearer ${token}` };
    const answers = {
      'POST /api/auth/login': login,
      'POST /api/auth/refresh': await request(server.app).post('/api/auth/refresh').set('Cookie', cookie).expect(200),
      'GET /api/auth/me': await request(server.app).get('/api/auth/me').set(auth).expect(200),
      'GET /api/users': await request(server.app).get('/api/users').set(auth).expect(200),
      [`GET /api/users/:id`]: await request(server.app).get(`/api/users/${admin.user.id}`).set(auth).expect(200),
      'GET /api/audit/sign-ins': await request(server.app).get('/api/audit/sign-ins').set(auth).expect(200),
      'a refusal': await request(server.app).get('/api/auth/me').expect(401),
    };
    const caching = Object.fromEntries(Object.entries(answers).map(([name, res]) => [name, res.headers['cache-control']]));
    expect(caching).toEqual(Object.fromEntries(Object.keys(answers).map((name) => [name, 'no-store'])));
  });
});
