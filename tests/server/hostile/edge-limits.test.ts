import { gzipSync } from 'node:zlib';
import request from 'supertest';
import { io as connect } from 'socket.io-client';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { Job } from '../../../server/entities/Job.js';
import { JobEvent } from '../../../server/entities/JobEvent.js';
import { COMMAND_RATE, MAX_JSON_DEPTH, PersonCommandRates, SOCKET_MESSAGE_LIMIT_BYTES, STOP_RATE } from '../../../server/middlewares/input-guard.js';
import { signedInUser } from '../../helpers/auth.js';
import { BoardClient, briefEveryone, httpCommand, signedInCrew, type CrewByRole } from '../../helpers/board.js';
import { addParts18m, seedModelAndUnit } from '../../helpers/fleet.js';
import { plannedJob } from '../../helpers/jobs.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

/**
 * The edge of the server against what a hostile or broken client sends: text with lone UTF-16
 * surrogates, malformed percent-encoding in a path, bodies too large or too deep, forbidden keys,
 * an oversized socket message and a flood of socket messages. Each is refused (or, for lone
 * surrogates, stored as U+FFFD everywhere) with our error shape, never a 500.
 */
const LONE_HIGH = '\uD800';
const LONE_LOW = '\uDC00';
const REPLACEMENT = '\uFFFD';

/** `depth` nested arrays around a value, as JSON text (depth 1 is `[value]`). */
const nestedJson = (depth: number, inner = '1') => '['.repeat(depth) + inner + ']'.repeat(depth);

describe('the edge against hostile input', () => {
  let server: TestServer;
  let crew: CrewByRole;
  let unitId: string;
  let liveJobId: string;
  const clients: BoardClient[] = [];
  const auth = () => ({ Authorization: `Bearer ${crew.supervisor.token}` });

  beforeAll(async () => {
    server = await startTestServer();
    crew = await signedInCrew(server);
    const admin = await signedInUser(server, { qualifications: [], isAdmin: true });
    const { model, unit } = await seedModelAndUnit(server, admin.token);
    unitId = unit.id;
    await addParts18m(server, admin.token, model.id, unit.id, 'E');
    const job = await plannedJob(server, crew, unitId, 'Edge job');
    await request(server.app).post(`/api/jobs/${job.id}/ready`).set(auth()).expect(200);
    expect((await httpCommand(server, crew.supervisor, job.id, { type: 'job.start' })).status).toBe(200);
    await briefEveryone(server, crew, job.id);
    liveJobId = job.id;
  });
  afterAll(async () => {
    for (const c of clients) c.close();
    await server.stop();
  });

  const client = () => {
    const c = new BoardClient(server.url, crew.supervisor.token);
    clients.push(c);
    return c;
  };
  const headOf = async (jobId: string) => {
    const job = await server.context.dataSource.manager.findOneByOrFail(Job, { id: jobId });
    return { lastSeq: job.lastSeq, headHash: job.headHash };
  };
  const expectHealthy = async () => {
    await request(server.app).get('/api/health').expect(200);
  };
  const verified = async (jobId: string) => (await request(server.app).get(`/api/jobs/${jobId}/record/verify`).set(auth()).expect(200)).body as { valid: boolean };

  describe('lone UTF-16 surrogates are stored as U+FFFD, wherever the text goes', () => {
    it('in a new job’s name and site (a job event), not a 500', async () => {
      const res = await request(server.app)
        .post('/api/jobs')
        .set(auth())
        .send({ name: `Raise ${LONE_HIGH} east`, site: `Yard ${LONE_LOW}`, craneUnitId: unitId, kind: 'erection' });
      expect(res.status, JSON.stringify(res.body)).toBe(201);
      expect(res.body.job.name).toBe(`Raise ${REPLACEMENT} east`);
      expect(res.body.job.site).toBe(`Yard ${REPLACEMENT}`);
      const events = await server.context.dataSource.manager.findBy(JobEvent, { jobId: res.body.job.id });
      expect(JSON.stringify(events.map((e) => e.data))).toContain(`Raise ${REPLACEMENT} east`);
      expect((await verified(res.body.job.id)).valid).toBe(true);
    });

    it('in a job’s renamed name (PATCH), not a 500', async () => {
      const job = await plannedJob(server, crew, unitId, 'Rename me');
      const res = await request(server.app).patch(`/api/jobs/${job.id}`).set(auth()).send({ name: `Renamed ${LONE_LOW}${LONE_HIGH}` });
      expect(res.status, JSON.stringify(res.body)).toBe(200);
      expect(res.body.job.name).toBe(`Renamed ${REPLACEMENT}${REPLACEMENT}`);
      expect((await verified(job.id)).valid).toBe(true);
    });

    it('in a stop reason over HTTP and a stop note over the socket', async () => {
      const stopped = await httpCommand(server, crew.rigger, liveJobId, { type: 'job.stop', reason: `Gust ${LONE_HIGH}`, pressedAt: new Date().toISOString() });
      expect(stopped.status, JSON.stringify(stopped.body)).toBe(200);
      const c = client();
      expect((await c.join(liveJobId)).ok).toBe(true);
      const noted = await c.command(liveJobId, { type: 'job.stop.note', reason: `Wind above limit ${LONE_LOW} at the tip` });
      expect(noted.ok, JSON.stringify(noted)).toBe(true);
      if (noted.ok) expect(noted.event.data).toMatchObject({ reason: `Wind above limit ${REPLACEMENT} at the tip` });
      const events = await server.context.dataSource.manager.findBy(JobEvent, { jobId: liveJobId });
      const reasons = events.filter((e) => e.type === 'job.stopped' || e.type === 'job.stop.noted').map((e) => (e.data as { reason: string | null }).reason);
      expect(reasons).toEqual([`Gust ${REPLACEMENT}`, `Wind above limit ${REPLACEMENT} at the tip`]);
      expect((await verified(liveJobId)).valid).toBe(true);
    });
  });

  describe('malformed percent-encoding in a path parameter', () => {
    it.each(['/api/jobs/%ZZ', '/api/jobs/%E0%A4%A/board', '/api/users/%', '/api/jobs/%ED%A0%80/events', '/api/uploads/%C0%AF'])('%s answers 400 with our error shape', async (path) => {
      const res = await request(server.app).get(path).set(auth());
      expect(res.status).toBe(400);
      expect(res.body.error).toMatchObject({ code: 'malformed_path' });
      expect(res.body.error.message).toMatch(/address/);
    });

    it('on a board command’s path too, leaving the log as it was', async () => {
      const before = await headOf(liveJobId);
      const res = await request(server.app).post('/api/jobs/%ZZ/commands').set(auth()).send({ type: 'job.stop', commandId: crypto.randomUUID(), pressedAt: new Date().toISOString() });
      expect(res.status).toBe(400);
      expect(res.body.error.code).toBe('malformed_path');
      expect(await headOf(liveJobId)).toEqual(before);
    });
  });

  describe('body size and depth', () => {
    it('answers a body over the limit with 413 and our error shape, not Express’s page', async () => {
      const res = await request(server.app)
        .post('/api/jobs')
        .set(auth())
        .set('Content-Type', 'application/json')
        .send(JSON.stringify({ name: 'x'.repeat(1_100_000), site: 'Yard', craneUnitId: unitId, kind: 'erection' }));
      expect(res.status).toBe(413);
      expect(res.headers['content-type']).toMatch(/application\/json/);
      expect(res.body.error).toMatchObject({ code: 'too_large' });
      expect(res.body.error.message).toMatch(/too large/);
    });

    it('answers a gzip body that inflates past the limit with 413 too_large, without inflating it all', async () => {
      // 64 MB of spaces inside a JSON string: about 64 KB on the wire. fetch sends the bytes as they are.
      const bomb = gzipSync(Buffer.concat([Buffer.from('{"name":"'), Buffer.alloc(64 * 1024 * 1024, 0x20), Buffer.from('"}')]));
      const started = Date.now();
      const res = await fetch(`${server.url}/api/jobs`, { method: 'POST', headers: { ...auth(), 'Content-Type': 'application/json', 'Content-Encoding': 'gzip' }, body: bomb });
      expect(res.status).toBe(413);
      expect(((await res.json()) as { error: { code: string } }).error.code).toBe('too_large');
      expect(Date.now() - started).toBeLessThan(3000);
      await expectHealthy();
    });

    it.each(['gzip', 'deflate', 'br'])('answers a body whose bytes are not the %s it claims with 400 and our error shape, not a 500', async (encoding) => {
      const res = await fetch(`${server.url}/api/jobs`, { method: 'POST', headers: { ...auth(), 'Content-Type': 'application/json', 'Content-Encoding': encoding }, body: '{"name":"plain text, not compressed"}' });
      expect(res.status).toBe(400);
      const body = (await res.json()) as { error: { code: string; message: string } };
      expect(body.error.code).toBe('bad_request');
      expect(body.error.message).toMatch(/could not be read/);
    });

    it(`refuses JSON nested deeper than ${MAX_JSON_DEPTH} levels with too_deep, and reads ${MAX_JSON_DEPTH} levels`, async () => {
      const body = (depth: number) => `{"name":"Deep","site":"Yard","craneUnitId":"${unitId}","kind":"erection","extra":${nestedJson(depth - 1)}}`;
      const deep = await request(server.app).post('/api/jobs').set(auth()).set('Content-Type', 'application/json').send(body(MAX_JSON_DEPTH + 1));
      expect(deep.status).toBe(400);
      expect(deep.body.error).toMatchObject({ code: 'too_deep' });
      expect(deep.body.error.message).toMatch(/levels/);
      // Brackets inside a string are text, not nesting.
      const quoted = await request(server.app).post('/api/jobs').set(auth()).set('Content-Type', 'application/json').send(`{"name":"${'['.repeat(100)}","site":"Yard","craneUnitId":"${unitId}","kind":"erection"}`);
      expect(quoted.status, JSON.stringify(quoted.body)).toBe(201);
      // At the limit the body is read; the unknown field is stripped by the job's schema.
      const atLimit = await request(server.app).post('/api/jobs').set(auth()).set('Content-Type', 'application/json').send(body(MAX_JSON_DEPTH));
      expect(atLimit.status, JSON.stringify(atLimit.body)).toBe(201);
      // Far deeper than any parser's stack: still a plain 400.
      const abyss = await request(server.app).post('/api/jobs').set(auth()).set('Content-Type', 'application/json').send(nestedJson(200_000));
      expect(abyss.status).toBe(400);
      expect(abyss.body.error.code).toBe('too_deep');
      await expectHealthy();
    });

    it.each(['__proto__', 'constructor', 'prototype'])('refuses a body carrying a “%s” key at any depth, changing nothing', async (key) => {
      const before = await headOf(liveJobId);
      const top = await request(server.app).post('/api/jobs').set(auth()).set('Content-Type', 'application/json').send(`{"name":"P","site":"Yard","craneUnitId":"${unitId}","kind":"erection","${key}":{"isAdmin":true}}`);
      expect(top.status).toBe(400);
      expect(top.body.error).toMatchObject({ code: 'forbidden_field' });
      expect(top.body.error.message).toContain(key);
      const inner = await request(server.app)
        .post(`/api/jobs/${liveJobId}/commands`)
        .set(auth())
        .set('Content-Type', 'application/json')
        .send(`{"type":"weather.record","commandId":"${crypto.randomUUID()}","meanMs":3,"gustMs":5,"heightM":10,"x":[{"${key}":{"polluted":true}}]}`);
      expect(inner.status).toBe(400);
      expect(inner.body.error.code).toBe('forbidden_field');
      expect(({} as Record<string, unknown>).polluted).toBeUndefined();
      expect(await headOf(liveJobId)).toEqual(before);
    });
  });

  describe('socket limits', () => {
    it('refuses a socket payload nested too deep or carrying __proto__, and cleans its lone surrogates', async () => {
      const c = client();
      await c.connected();
      const before = await headOf(liveJobId);
      const deep = JSON.parse(nestedJson(MAX_JSON_DEPTH + 5)) as unknown;
      const tooDeep = await c.socket.emitWithAck('board:command', { jobId: liveJobId, command: deep } as never);
      expect(tooDeep).toMatchObject({ ok: false, error: { code: 'too_deep' } });
      const proto = await c.socket.emitWithAck('board:join', JSON.parse(`{"jobId":"${liveJobId}","__proto__":{"x":1}}`) as never);
      expect(proto).toMatchObject({ ok: false, error: { code: 'forbidden_field' } });
      expect(await headOf(liveJobId)).toEqual(before);
    });

    it(`closes a socket whose message is over ${SOCKET_MESSAGE_LIMIT_BYTES} bytes; the server keeps serving and the client reconnects`, async () => {
      const c = client();
      await c.connected();
      const closed = new Promise<string>((resolve) => c.socket.once('disconnect', (reason) => resolve(reason)));
      c.socket.emit('board:join', { jobId: liveJobId, pad: 'x'.repeat(SOCKET_MESSAGE_LIMIT_BYTES + 10) } as never, () => undefined);
      // The transport is closed under the client: it sees a transport close and, by itself, reconnects.
      expect(await closed).toBe('transport close');
      await expectHealthy();
      const again = client();
      expect((await again.join(liveJobId)).ok).toBe(true);
    });

    it(`answers a flood from one socket with too_many_commands (${COMMAND_RATE.perSecond}/s, burst ${COMMAND_RATE.burst}), other sockets unaffected, and serves it again after a pause`, async () => {
      const flooder = client();
      const other = client();
      await Promise.all([flooder.connected(), other.connected()]);
      const before = await headOf(liveJobId);
      // Malformed commands: what is let through is refused by the schema, so the log stays as it was.
      const answers = await Promise.all(Array.from({ length: COMMAND_RATE.burst * 3 }, () => flooder.socket.emitWithAck('board:command', { jobId: liveJobId, command: { type: 'nonsense' } } as never)));
      const codes = answers.map((a) => (a as { error?: { code: string } }).error?.code);
      expect(codes.filter((code) => code === 'validation').length).toBeGreaterThanOrEqual(COMMAND_RATE.burst);
      expect(codes.filter((code) => code === 'too_many_commands').length).toBeGreaterThanOrEqual(COMMAND_RATE.burst);
      const refusal = answers.find((a) => (a as { error?: { code: string } }).error?.code === 'too_many_commands') as { error: { message: string } };
      expect(refusal.error.message).toMatch(/Wait/);
      expect(codes.filter((code) => code !== 'validation' && code !== 'too_many_commands')).toEqual([]);
      // A stop is never held back by the rate, even from the socket that flooded.
      const stop = await flooder.command(liveJobId, { type: 'job.stop', pressedAt: new Date().toISOString() });
      expect(stop.ok, JSON.stringify(stop)).toBe(true);
      // Another socket of the same person is not held back.
      expect(await other.socket.emitWithAck('board:command', { jobId: liveJobId, command: { type: 'nonsense' } } as never)).toMatchObject({ ok: false, error: { code: 'validation' } });
      await new Promise((r) => setTimeout(r, 250));
      expect(await flooder.socket.emitWithAck('board:command', { jobId: liveJobId, command: { type: 'nonsense' } } as never)).toMatchObject({ ok: false, error: { code: 'validation' } });
      // Only the stop was recorded.
      expect((await headOf(liveJobId)).lastSeq).toBe(before.lastSeq + 1);
      await expectHealthy();
    });

    it('malformed Socket.IO frames written straight to the transport close or leave only that connection; everyone else carries on', async () => {
      const watcher = client();
      expect((await watcher.join(liveJobId)).ok).toBe(true);
      const before = await headOf(liveJobId);
      // Each is a Socket.IO packet as a hostile client could write it, past the client library's encoder.
      const frames = ['2["board:command"', '2[42,{}]', '2[]', '2{}', '2/admin,["board:join",{}]', '2["__proto__",{}]', '299999999999999999999["board:join",{}]', '0{"token":"x"}', '51-["board:command",{"_placeholder":true,"num":7}]', '1'];
      const closedBy: Record<string, string> = {};
      for (const frame of frames) {
        const c = client();
        await c.connected();
        c.socket.once('disconnect', (reason) => (closedBy[frame] = reason));
        c.socket.io.engine.write(frame);
        await new Promise((r) => setTimeout(r, 50));
      }
      // The frames reach the server: one it cannot parse closes that connection.
      expect(closedBy['2["board:command"']).toBe('transport close');
      await expectHealthy();
      expect(watcher.socket.connected).toBe(true);
      expect(await watcher.socket.emitWithAck('board:join', { jobId: liveJobId })).toMatchObject({ ok: true });
      expect(await headOf(liveJobId)).toEqual(before);
    });

    it('lets a crew member send a burst a real crew could, at a real pace, without refusal', async () => {
      const c = client();
      await c.connected();
      const codes: (string | undefined)[] = [];
      // Ten a second for two seconds: more than any person taps.
      for (let i = 0; i < 20; i++) {
        codes.push(((await c.socket.emitWithAck('board:command', { jobId: liveJobId, command: { type: 'nonsense' } } as never)) as { error?: { code: string } }).error?.code);
        await new Promise((r) => setTimeout(r, 100));
      }
      expect(codes.every((code) => code === 'validation')).toBe(true);
    });

    it(`holds a flood of 200 stops from one socket to a few recorded presses (stops: burst ${STOP_RATE.burst}, ${STOP_RATE.perSecond} a second); the health route answers at once during it`, async () => {
      const flooder = new BoardClient(server.url, crew.rigger.token);
      clients.push(flooder);
      await flooder.connected();
      const before = await headOf(liveJobId);
      const sent = performance.now();
      const stops = Array.from({ length: 200 }, () => flooder.command(liveJobId, { type: 'job.stop', pressedAt: new Date().toISOString() }));
      // The first press is answered; whatever the flood left in the write queue is still behind it.
      const first = await stops[0]!;
      expect(first.ok, JSON.stringify(first)).toBe(true);
      const started = performance.now();
      await expectHealthy();
      const healthMs = performance.now() - started;
      const answers = await Promise.all(stops);
      const seconds = (performance.now() - sent) / 1000;
      const written = (await headOf(liveJobId)).lastSeq - before.lastSeq;
      expect(written).toBe(answers.filter((a) => a.ok).length);
      // The burst, and the refill for the time the flood took (well under a second here).
      expect(written).toBeLessThanOrEqual(STOP_RATE.burst + Math.ceil(seconds * STOP_RATE.perSecond));
      const refused = answers.filter((a) => !a.ok);
      expect(refused.length).toBeGreaterThanOrEqual(200 - written);
      for (const a of refused) if (!a.ok) expect(a.error.code).toBe('too_many_commands');
      expect(healthMs).toBeLessThan(1000);
      expect((await verified(liveJobId)).valid).toBe(true);
      // That a flood of other messages never holds a stop back is the flood test's above.
    });
  });

  describe('board commands over HTTP, per person', () => {
    type Answer = { status: number; retryAfter: string | null; body: { ok?: boolean; error?: { code: string; message: string } } };
    const post = async (who: { token: string }, body: unknown): Promise<Answer> => {
      const res = await fetch(`${server.url}/api/jobs/${liveJobId}/commands`, { method: 'POST', headers: { Authorization: `Bearer ${who.token}`, 'Content-Type': 'application/json' }, body: JSON.stringify(body) });
      return { status: res.status, retryAfter: res.headers.get('retry-after'), body: (await res.json()) as Answer['body'] };
    };
    const nonsense = () => ({ type: 'nonsense', commandId: crypto.randomUUID() });
    const stop = () => ({ type: 'job.stop', commandId: crypto.randomUUID(), pressedAt: new Date().toISOString() });
    /**
     * Holds the rate buckets' clock (performance.now) still while `run` floods: a hundred HTTP
     * requests can take seconds on a busy machine, and the refill meanwhile would blur the counts.
     */
    const withClockStill = async <T,>(run: () => Promise<T>): Promise<T> => {
      const spy = vi.spyOn(performance, 'now').mockReturnValue(performance.now());
      try {
        return await run();
      } finally {
        spy.mockRestore();
      }
    };

    it(`answers a flood from one person with 429 too_many_commands and Retry-After (${COMMAND_RATE.perSecond}/s, burst ${COMMAND_RATE.burst}); another person is not held back, and the first is served again after a pause`, async () => {
      const before = await headOf(liveJobId);
      const { answers, other } = await withClockStill(async () => ({
        answers: await Promise.all(Array.from({ length: COMMAND_RATE.burst + 10 }, () => post(crew.signaller, nonsense()))),
        other: await post(crew.operator, nonsense()),
      }));
      const codes = answers.map((a) => a.body.error?.code);
      // The burst reaches the route (and the schema refuses the nonsense); the rest is refused at the door.
      expect(codes.filter((code) => code === 'validation').length).toBe(COMMAND_RATE.burst);
      expect(codes.filter((code) => code === 'too_many_commands').length).toBe(10);
      const refusal = answers.find((a) => a.body.error?.code === 'too_many_commands')!;
      expect(refusal.status).toBe(429);
      expect(refusal.retryAfter).toBe('1');
      expect(refusal.body).toMatchObject({ error: { code: 'too_many_commands', message: expect.stringMatching(/Wait/) } });
      // Another person of the same crew is not held back.
      expect(other.body.error?.code).toBe('validation');
      await new Promise((r) => setTimeout(r, 250));
      expect((await post(crew.signaller, nonsense())).body.error?.code).toBe('validation');
      expect(await headOf(liveJobId)).toEqual(before);
    });

    it(`holds a flood of 60 stops from one person to ${STOP_RATE.burst} recorded presses, the first let through right after a flood of other commands`, async () => {
      const before = await headOf(liveJobId);
      const { drained, first, answers } = await withClockStill(async () => ({
        drained: await Promise.all(Array.from({ length: COMMAND_RATE.burst + 5 }, () => post(crew.signaller, nonsense()))),
        first: await post(crew.signaller, stop()),
        answers: await Promise.all(Array.from({ length: 60 }, () => post(crew.signaller, stop()))),
      }));
      // Some refused: this person's message bucket is empty (the clock is still, nothing refills).
      expect(drained.filter((a) => a.body.error?.code === 'too_many_commands').length).toBeGreaterThanOrEqual(5);
      expect(first.status, JSON.stringify(first.body)).toBe(200);
      const written = (await headOf(liveJobId)).lastSeq - before.lastSeq;
      expect(written).toBe(STOP_RATE.burst);
      expect(answers.filter((a) => a.status === 200).length).toBe(STOP_RATE.burst - 1);
      const refused = answers.filter((a) => a.status !== 200);
      for (const a of refused) expect(a).toMatchObject({ status: 429, retryAfter: '1', body: { error: { code: 'too_many_commands' } } });
      expect(refused[0]!.body.error!.message).toMatch(/press stop again/);
      await expectHealthy();
      expect((await verified(liveJobId)).valid).toBe(true);
    });
  });

  it('a person’s HTTP buckets are never forgotten while not refilled, however many other people send (a forgotten bucket would start full again)', () => {
    let now = 0;
    const rates = new PersonCommandRates(() => now);
    for (let i = 0; i < COMMAND_RATE.burst; i++) expect(rates.take('drained', false)).toBeNull();
    for (let i = 0; i < STOP_RATE.burst; i++) expect(rates.take('drained', true)).toBeNull();
    // Enough other people to make the map forget the idle ones, several times over.
    for (let i = 0; i < 1000; i++) rates.take(`person-${i}`, i % 2 === 0);
    expect(rates.take('drained', false)?.error.code).toBe('too_many_commands');
    const stopRefused = rates.take('drained', true);
    expect(stopRefused?.error.code).toBe('too_many_commands');
    expect(stopRefused?.waitMs).toBe(1000 / STOP_RATE.perSecond);
    now += 1000 / STOP_RATE.perSecond;
    expect(rates.take('drained', true)).toBeNull();
    expect(rates.take('drained', false)).toBeNull();
  });

  it('a new socket still connects after all of the above', async () => {
    const s = connect(server.url, { transports: ['websocket'], auth: { token: crew.rigger.token }, reconnection: false, forceNew: true });
    await new Promise<void>((resolve, reject) => {
      s.once('connect', () => resolve());
      s.once('connect_error', reject);
    });
    s.close();
  });
});
