import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { RESET_ANSWER } from '../../../server/routes/auth.js';
import { PAIR_FREE_FAILURES, RESET_PER_ACCOUNT, RESET_PER_ADDRESS } from '../../../server/auth/throttle.js';
import { insertUser, TEST_PASSWORD } from '../../helpers/factories.js';
import { signedInUser } from '../../helpers/auth.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

/**
 * Password guessing is slowed per account-and-address and per address, with growing waits,
 * without locking the person out from elsewhere; reset e-mails are limited per account and
 * address behind one neutral answer. The waits' growth and the per-address count are in
 * throttle.test.ts (no bcrypt there). Requests come through the loopback proxy the app trusts,
 * so X-Forwarded-For sets each request's address.
 */
describe('sign-in and reset limits', () => {
  let server: TestServer;
  beforeAll(async () => {
    server = await startTestServer();
  });
  afterAll(() => server.stop());

  const login = (address: string, email: string, password: string) => request(server.app).post('/api/auth/login').set('X-Forwarded-For', address).send({ email, password });

  it('slows one address guessing one person, while the person signs in from elsewhere', async () => {
    const { user } = await signedInUser(server);
    const attacker = '198.51.100.7';
    for (let i = 0; i < PAIR_FREE_FAILURES; i++) await login(attacker, user.email, `guess-${i}`).expect(401);

    const first = await login(attacker, user.email, 'guess-next').expect(429);
    expect(first.body.error).toEqual({ code: 'rate_limited', message: 'Too many failed sign-ins for this account from here. Wait 1 second and try again, or reset your password.' });
    expect(first.headers['retry-after']).toBe('1');
    // The right password from the guessing address waits too: the wait is for the address and the account together.
    await login(attacker, user.email, TEST_PASSWORD).expect(429);
    // From the person's own address the right password signs in at once.
    await login('203.0.113.20', user.email, TEST_PASSWORD).expect(200);

    // After the wait, the address may try again (the waits grow: tests/server/security/throttle.test.ts).
    server.advance(1000);
    await login(attacker, user.email, 'guess-after-the-wait').expect(401);
  });

  it('counts a burst of parallel guesses before bcrypt answers, so a burst gets no more tries than a sequence', async () => {
    const { user } = await signedInUser(server);
    const burst = await Promise.all(Array.from({ length: 20 }, (_, i) => login('198.51.100.8', user.email, `parallel-${i}`)));
    const statuses = burst.map((r) => r.status).sort();
    expect(statuses.filter((s) => s === 401)).toHaveLength(PAIR_FREE_FAILURES);
    expect(statuses.filter((s) => s === 429)).toHaveLength(20 - PAIR_FREE_FAILURES);
  });

  it('answers 60 reset requests for one person the same way and sends at most the account’s limit of e-mails', async () => {
    const user = await server.context.queue.transaction((m) => insertUser(m, { email: 'many.resets@example.test', password: undefined }));
    const answers = [];
    for (let i = 0; i < 60; i++) {
      answers.push(await request(server.app).post('/api/auth/password-reset').set('X-Forwarded-For', `192.0.2.${(i % 50) + 1}`).send({ email: user.email }));
    }
    expect(new Set(answers.map((a) => a.status))).toEqual(new Set([202]));
    expect(new Set(answers.map((a) => a.body.message))).toEqual(new Set([RESET_ANSWER]));
    const sent = server.context.mailer.fake!.messages.filter((m) => m.to.includes(user.email));
    expect(sent).toHaveLength(RESET_PER_ACCOUNT);
  });

  it('limits reset e-mails from one address across accounts, with the same answer', async () => {
    const people: string[] = [];
    for (let i = 0; i < RESET_PER_ADDRESS + 2; i++) people.push((await server.context.queue.transaction((m) => insertUser(m, { email: `reset-spray-${i}@example.test`, password: undefined }))).email);
    for (const email of people) {
      const answer = await request(server.app).post('/api/auth/password-reset').set('X-Forwarded-For', '198.51.100.11').send({ email }).expect(202);
      expect(answer.body.message).toBe(RESET_ANSWER);
    }
    const sent = server.context.mailer.fake!.messages.filter((m) => m.to.some((to) => people.includes(to)));
    expect(sent).toHaveLength(RESET_PER_ADDRESS);
  });

  // Moves the shared clock three hours: kept last in the file.
  it('a request every ten minutes from anywhere cannot stop a person’s reset e-mails: only e-mails sent count against the account', async () => {
    const user = await server.context.queue.transaction((m) => insertUser(m, { email: 'kept.out@example.test', password: undefined }));
    const sentAt: number[] = [];
    for (let i = 0; i < 18; i++) {
      if (i > 0) server.advance(10 * 60 * 1000);
      const before = server.context.mailer.fake!.messages.filter((m) => m.to.includes(user.email)).length;
      await request(server.app).post('/api/auth/password-reset').set('X-Forwarded-For', `203.0.113.${i + 1}`).send({ email: user.email }).expect(202);
      if (server.context.mailer.fake!.messages.filter((m) => m.to.includes(user.email)).length > before) sentAt.push(i * 10);
    }
    // Three e-mails in each sliding hour: at 0, 10, 20 minutes, again once those are an hour old, and so on.
    expect(sentAt).toEqual([0, 10, 20, 60, 70, 80, 120, 130, 140]);
  });
});
