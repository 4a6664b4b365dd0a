import { randomUUID } from 'node:crypto';
import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import fc from 'fast-check';
import { io as connect, type Socket } from 'socket.io-client';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { policyTable, type PolicyRow } from '../../../server/policies/index.js';
import { signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { briefEveryone, httpCommand, signedInCrew, uploadPhoto, type CrewByRole } from '../../helpers/board.js';
import { addParts18m, seedModelAndUnit } from '../../helpers/fleet.js';
import { plannedJob } from '../../helpers/jobs.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

/**
 * fast-check at every HTTP route and every socket event of the policy table (the same table the
 * coverage test checks against the real app): wrong types, missing and extra fields, long text,
 * deep nesting, `__proto__` and `constructor` keys, numbers as text, what NaN and Infinity become
 * on the way (JSON carries them as null; text "NaN", "Infinity" and 1e308-sized numbers arrive
 * as such), lone surrogates, huge arrays, malformed JSON and malformed path parameters. Always a
 * 4xx (or `ok: false`) with a code and a message, never a 5xx; the database unchanged by every
 * refusal; the server answering its health route afterwards.
 */

const root = path.resolve(import.meta.dirname, '..', '..', '..');
/** Runs are bounded to keep the file near 20 s; `HOLDLINE_FUZZ_RUNS=10` explores ten times as long. */
const RUNS = Math.max(1, Number(process.env.HOLDLINE_FUZZ_RUNS ?? 1));

/** Every field name our shared schemas declare, read from their source: the hostile bodies use the names the routes look for. */
function schemaFieldNames(): string[] {
  const names = new Set<string>(['commandId', 'jobId', 'afterSeq', 'jobIds', 'token', 'command']);
  for (const dir of ['shared/schemas', 'shared/events']) {
    for (const file of readdirSync(path.join(root, dir)).filter((f) => f.endsWith('.ts'))) {
      for (const [, name] of readFileSync(path.join(root, dir, file), 'utf8').matchAll(/\b([a-zA-Z]+)\??: z\./g)) names.add(name);
    }
  }
  return [...names].sort();
}
const fieldNames = schemaFieldNames();

const LONE = ['\uD800', '\uDFFF', 'a\uD83D', '\uDE00b', '\uDBFF\uDBFF'];

/** One hostile leaf value: wrong types, text where numbers go and back, edge numbers, lone surrogates, long text. */
const leaf = (ids: string[]): fc.Arbitrary<unknown> =>
  fc.oneof(
    fc.string({ maxLength: 40 }),
    fc.string({ unit: 'binary', maxLength: 20 }),
    fc.constantFrom(...LONE),
    fc.integer(),
    fc.double(), // NaN and ±Infinity travel as null in JSON, as a client's JSON.stringify sends them
    fc.constantFrom(1e308, -1e308, Number.MAX_SAFE_INTEGER + 2, -0, 0.1 + 0.2, 2 ** 53),
    fc.constantFrom('NaN', 'Infinity', '-Infinity', '1e999', '12', '0x10', '', ' ', '1,5', '10 m', 'null', 'true', '[]', '{}'),
    fc.constantFrom(null, true, false),
    fc.constantFrom('x'.repeat(5_000), 'é'.repeat(70_000), `${'\uD800'.repeat(1_000)}`),
    fc.constantFrom(...ids, randomUUID(), '00000000-0000-0000-0000-000000000000', '../../etc/passwd', 'a@b', '<script>alert(1)</script>', "' OR 1=1 --"),
    fc.date({ noInvalidDate: true }).map((d) => d.toISOString()),
  );

/** A hostile JSON-able value: leaves, objects keyed by our field names (and prototype keys), arrays, huge arrays. */
const hostileValue = (ids: string[]) =>
  fc.letrec((tie) => ({
    value: fc.oneof({ depthSize: 'small', withCrossShrink: true }, { arbitrary: leaf(ids), weight: 4 }, { arbitrary: tie('object'), weight: 2 }, { arbitrary: tie('array'), weight: 1 }),
    object: fc.dictionary(fc.oneof({ arbitrary: fc.constantFrom(...fieldNames), weight: 6 }, { arbitrary: fc.constantFrom('__proto__', 'constructor', 'prototype', 'toString', 'hasOwnProperty', ''), weight: 1 }, fc.string({ maxLength: 8 })), tie('value'), { maxKeys: 6 }),
    array: fc.array(tie('value'), { maxLength: 5 }),
  })).value;

/**
 * What a Socket.IO client can send beyond JSON: binary (a Buffer or typed array, carried as an
 * attachment), alone or in place of a field; NaN and Infinity still travel as null.
 */
const socketValue = (ids: string[]): fc.Arbitrary<unknown> =>
  fc.oneof(
    { arbitrary: hostileValue(ids), weight: 5 },
    { arbitrary: fc.uint8Array({ maxLength: 64 }).map((bytes) => Buffer.from(bytes)), weight: 1 },
    { arbitrary: fc.tuple(fc.constantFrom(...fieldNames), fc.uint8Array({ maxLength: 16 })).map(([key, bytes]) => ({ [key]: bytes, jobId: ids[0] })), weight: 1 },
    { arbitrary: fc.constantFrom(NaN, Infinity, -Infinity).map((n) => ({ jobId: ids[0], afterSeq: n, jobIds: [n] })), weight: 1 },
  );

/** What goes on the wire as a request body: JSON of a hostile value, or text that is not JSON at all, or structure past every limit. */
const hostileBody = (ids: string[]): fc.Arbitrary<string> =>
  fc.oneof(
    { arbitrary: hostileValue(ids).map((v) => JSON.stringify(v) ?? 'null'), weight: 12 },
    { arbitrary: fc.constantFrom('{', '{"a":}', '[1,2', 'NaN', '{"a":NaN}', '{"a":Infinity}', "{'a':1}", '\u0000', '', '{"a":1}{"b":2}', '"\\ud800"'), weight: 2 },
    { arbitrary: fc.integer({ min: 33, max: 5_000 }).map((d) => '['.repeat(d) + ']'.repeat(d)), weight: 1 },
    { arbitrary: fc.integer({ min: 10_000, max: 120_000 }).map((n) => JSON.stringify({ items: Array.from({ length: n }, (_, i) => i), members: Array.from({ length: n / 100 }, () => ({ userId: 'x', role: 'rigger' })) })), weight: 1 },
    { arbitrary: fc.constantFrom('{"__proto__":{"isAdmin":true}}', '{"constructor":{"prototype":{"polluted":true}}}', '{"values":{"__proto__":{"x":1}}}'), weight: 1 },
  );

/** A path parameter as a hostile client would write it: raw (malformed %-encoding included) or encoded. */
const hostileParam = fc.oneof(
  fc.constantFrom('%ZZ', '%', '%E0%A4%A', '%ED%A0%80', '%C0%AF', '%00', '..%2F..%2Fetc', '%2e%2e', 'a'.repeat(5_000), '-1', '1e999', 'NaN', 'null', '%F0%9F%98%80'),
  fc.string({ maxLength: 60 }).filter((s) => s.length > 0).map((s) => encodeURIComponent(s)),
  fc.string({ unit: 'grapheme', maxLength: 10 }).filter((s) => s.length > 0).map((s) => encodeURIComponent(s)),
);

/** A hostile query string: repeated keys, bracket keys, malformed %, long values. */
const hostileQuery = fc.oneof(
  fc.dictionary(fc.constantFrom('after', 'expect', 'q', 'limit', 'photos', 'audience', 'state', 'kind', 'page', 'x'), fc.string({ maxLength: 30 }), { maxKeys: 4 }).map((d) => new URLSearchParams(d).toString()),
  fc.constantFrom('after=-1', 'after=1e999', 'after=NaN', 'after=1&after=2', 'after[]=1', 'after[a]=1', 'expect=%ZZ', '%ZZ=%E0', `expect=${'f'.repeat(10_000)}`, 'limit=Infinity', '__proto__[x]=1', 'constructor=1'),
);

/**
 * Well-formed bodies of the routes that write what people type into a job's log, a person or the
 * fleet. A hostile body is often one of these with one field taken away, added or given a hostile
 * value: that reaches past the schema into the command, where a lone surrogate once answered 500.
 */
const validBodies = (ids: Record<string, string>): Record<string, (() => Record<string, unknown>)[]> => ({
  'POST /api/jobs': [() => ({ name: 'Fuzz job', site: 'Fuzz yard', craneUnitId: ids.unitId, kind: 'erection' })],
  'PATCH /api/jobs/:jobId': [() => ({ name: 'Renamed job', site: 'Other yard' })],
  'POST /api/jobs/:jobId/commands': [
    () => ({ type: 'weather.record', commandId: randomUUID(), meanMs: 3, gustMs: 5, heightM: 10 }),
    () => ({ type: 'job.stop', commandId: randomUUID(), reason: 'Gust at the tip', pressedAt: new Date().toISOString() }),
    () => ({ type: 'job.stop.note', commandId: randomUUID(), reason: 'Gust at the tip' }),
  ],
  'POST /api/users': [() => ({ email: `fuzz-${randomUUID().slice(0, 8)}@example.test`, displayName: 'Fuzz person', qualifications: ['rigger'], isAdmin: false })],
  'PATCH /api/users/:userId': [() => ({ displayName: 'Fuzz renamed' })],
  'POST /api/auth/login': [() => ({ email: 'nobody@example.test', password: 'correct-horse-battery' })],
  'POST /api/crane-units': [() => ({ fleetNumber: `FZ-${randomUUID().slice(0, 6)}`, modelId: ids.modelId, location: 'Yard' })],
  'POST /api/components': [() => ({ serial: `FZ-${randomUUID().slice(0, 6)}`, kind: 'section', typeId: 'ins3', modelId: ids.modelId, unitId: ids.unitId })],
  'POST /api/components/:componentId/inspections': [() => ({ result: 'serviceable', notes: 'Pins and lacing checked' })],
  'POST /api/jobs/:jobId/acting-supervisor': [() => ({ userId: ids.supervisorId, reason: 'The supervisor is off site today' })],
  'POST /api/jobs/:jobId/overrides': [() => ({ action: 'request', figureKey: 'chart.lift', reason: 'Checked against the manufacturer today' })],
});

/**
 * One valid body with one change a hostile client would make: a field dropped, a field set (or
 * added) with a hostile value, or a lone surrogate slipped into one of its texts (which keeps the
 * body valid: it must then be stored as U+FFFD, not answered 500).
 */
const mutatedBody = (bases: (() => Record<string, unknown>)[], ids: string[]): fc.Arbitrary<string> =>
  fc
    .tuple(fc.constantFrom(...bases), fc.constantFrom('drop', 'set', 'add', 'surrogate'), fc.nat(), fc.constantFrom(...fieldNames, '__proto__'), hostileValue(ids), fc.constantFrom(...LONE))
    .map(([base, change, pick, extraKey, value, lone]) => {
      const body = base();
      const keys = Object.keys(body);
      const texts = keys.filter((k) => typeof body[k] === 'string' && k !== 'type');
      const key = change === 'add' ? extraKey : change === 'surrogate' ? texts[pick % texts.length] : keys[pick % keys.length];
      if (change === 'drop') delete body[key];
      else if (change === 'surrogate') {
        const text = body[key] as string;
        const at = pick % (text.length + 1);
        body[key] = text.slice(0, at) + lone + text.slice(at);
      } else Object.defineProperty(body, key, { value, enumerable: true, writable: true, configurable: true });
      return JSON.stringify(body);
    });

interface SnapshotRow { name: string; count: number }

/** Routes whose answer is 2xx whatever body they get, each with the reason. */
const acceptsAnyBody: Record<string, string> = {
  'POST /api/auth/logout': 'signing out revokes the refresh cookie sent, if any, and reads no body',
  'POST /api/auth/password-reset': 'the answer never says whether an address has an account, so any request is "sent"',
  'POST /api/users/:userId/invitation': 'sends the person a fresh invitation link; it reads no body',
  // A partial change ignores fields it does not know: a body of only unknown fields (or {}) changes
  // nothing and answers the thing as it is; a generated value that happens to be valid is a change.
  'PATCH /api/users/:userId': 'a partial change of a person made for this test (on no crew)',
  'PATCH /api/jobs/:jobId': 'a partial change of the job',
  'PATCH /api/crane-models/:modelId': 'a partial change of the model',
  'PATCH /api/crane-units/:unitId': 'a partial change of the unit',
  'PATCH /api/components/:componentId': 'a partial change of the component',
};

/** Tables written by a refused request on purpose. */
const auditTables = new Set(['sign_in_audit']);

describe('hostile input at every route and socket event', () => {
  let server: TestServer;
  let admin: SignedInUser;
  let crew: CrewByRole;
  let ids: Record<string, string>;
  let jobId: string;

  beforeAll(async () => {
    server = await startTestServer();
    admin = await signedInUser(server, { qualifications: [], isAdmin: true });
    crew = await signedInCrew(server);
    const { model, unit } = await seedModelAndUnit(server, admin.token);
    const parts = await addParts18m(server, admin.token, model.id, unit.id, 'H');
    const job = await plannedJob(server, crew, unit.id, 'Hostile job');
    await request(server.app).post(`/api/jobs/${job.id}/ready`).set('Authorization', `Bearer ${crew.supervisor.token}`).expect(200);
    expect((await httpCommand(server, crew.supervisor, job.id, { type: 'job.start' })).status).toBe(200);
    await briefEveryone(server, crew, job.id);
    jobId = job.id;
    ids = {
      jobId,
      userId: (await signedInUser(server, { qualifications: ['rigger'] })).user.id,
      modelId: model.id,
      unitId: unit.id,
      componentId: Object.values(parts)[0],
      assistCraneId: randomUUID(),
      uploadId: await uploadPhoto(server, crew.rigger),
      token: 'not-a-real-link-token',
      supervisorId: crew.supervisor.user.id,
    };
  });
  afterAll(() => server.stop());

  /** Rows of every table, and every job's head: what a refusal must leave as it was. */
  let countsQuery: string | undefined;
  async function snapshot(): Promise<{ tables: SnapshotRow[]; heads: unknown[] }> {
    const { manager } = server.context.dataSource;
    if (!countsQuery) {
      const names = (await manager.query(`SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name`)) as { name: string }[];
      countsQuery = names
        .filter(({ name }) => !auditTables.has(name))
        .map(({ name }) => `SELECT '${name}' AS name, COUNT(*) AS count FROM "${name}"`)
        .join(' UNION ALL ');
    }
    const tables = ((await manager.query(countsQuery)) as SnapshotRow[]).map((r) => ({ name: r.name, count: Number(r.count) }));
    const heads = (await manager.query(`SELECT id, last_seq, head_hash, updated_at FROM job ORDER BY id`)) as unknown[];
    return { tables, heads };
  }

  const expectErrorShape = (status: number, body: unknown, what: string) => {
    expect(status, what).toBeGreaterThanOrEqual(400);
    expect(status, what).toBeLessThan(500);
    const error = (body as { error?: { code?: unknown; message?: unknown } }).error;
    expect(typeof error?.code, `${what}: ${JSON.stringify(body)}`).toBe('string');
    expect(typeof error?.message === 'string' && error.message.length > 0, `${what}: ${JSON.stringify(body)}`).toBe(true);
  };

  /** Who calls a row's routes: someone it admits, so the hostile input gets past the policy to the schema. */
  function callerFor(row: PolicyRow): SignedInUser | null {
    if (row.allow.includes('anyone')) return null;
    // The job's supervisor is on its crew and qualified as a supervisor; the admin is on no crew.
    return row.allow.includes('admin') ? admin : crew.supervisor;
  }

  const routes = (policyTable as readonly PolicyRow[]).flatMap((row) => row.routes.map((route) => ({ row, route })));
  const withBody = routes.filter(({ route }) => !route.startsWith('GET '));
  const reads = routes.filter(({ route }) => route.startsWith('GET '));
  const accepted = new Map<string, number>();

  const fillPath = (pattern: string, hostile?: string) => pattern.replace(/:([a-zA-Z]+)/g, (_, name: string) => hostile ?? ids[name] ?? randomUUID());

  it.each(withBody)('$route: hostile bodies get a 4xx with a message, never a 5xx, and change nothing', async ({ row, route }) => {
    const [method, pattern] = route.split(' ') as [string, string];
    const caller = callerFor(row);
    const bases = validBodies(ids)[route];
    const bodies = bases ? fc.oneof(hostileBody(Object.values(ids)), mutatedBody(bases, Object.values(ids))) : hostileBody(Object.values(ids));
    await fc.assert(
      fc.asyncProperty(bodies, fc.option(hostileParam, { freq: bases ? 8 : 4 }), async (body, param) => {
        const before = await snapshot();
        const url = fillPath(pattern, param ?? undefined);
        let req = request(server.app)[method.toLowerCase() as 'post' | 'put' | 'patch' | 'delete'](url).set('Content-Type', 'application/json');
        if (caller) req = req.set('Authorization', `Bearer ${caller.token}`);
        const res = await req.send(body);
        expect(res.status, `${route} with ${url.slice(0, 120)} ${body.slice(0, 300)}: ${JSON.stringify(res.body).slice(0, 300)}`).toBeLessThan(500);
        if (res.status < 300) {
          // A body that is still valid after its one change is a real request, and does what it says.
          if (bases) return;
          accepted.set(route, (accepted.get(route) ?? 0) + 1);
          expect(Object.keys(acceptsAnyBody), `${route} accepted ${body.slice(0, 300)}: ${JSON.stringify(res.body).slice(0, 300)}`).toContain(route);
          return;
        }
        expectErrorShape(res.status, res.body, `${route} with ${url.slice(0, 120)} ${body.slice(0, 300)}`);
        expect(await snapshot(), `${route} changed the database while refusing ${body.slice(0, 300)}`).toEqual(before);
      }),
      { numRuns: (bases ? 20 : 10) * RUNS },
    );
  });

  it.each(reads)('$route: hostile path parameters and queries get a 4xx with a message or an answer, never a 5xx', async ({ row, route }) => {
    const [, pattern] = route.split(' ') as [string, string];
    const caller = callerFor(row);
    // A real id on a document route would render a whole PDF or archive per run: those get hostile ids only.
    const heavy = /\.(pdf|zip)$/.test(pattern);
    await fc.assert(
      fc.asyncProperty(heavy || !pattern.includes(':') ? fc.option(hostileParam, { nil: undefined, freq: 4 }) : fc.option(hostileParam, { nil: undefined, freq: 2 }), hostileQuery, async (param, query) => {
        const before = await snapshot();
        const url = `${fillPath(pattern, heavy && pattern.includes(':') ? (param ?? '%ZZ') : param)}?${query}`;
        let req = request(server.app).get(url);
        if (caller) req = req.set('Authorization', `Bearer ${caller.token}`);
        const res = await req;
        expect(res.status, `${url.slice(0, 200)}: ${res.text?.slice(0, 300)}`).toBeLessThan(500);
        if (res.status >= 400) expectErrorShape(res.status, res.body, url.slice(0, 200));
        expect(await snapshot(), `${url.slice(0, 200)} changed the database`).toEqual(before);
      }),
      { numRuns: (heavy ? 3 : 4) * RUNS },
    );
  });

  it('hostile Authorization, Cookie, Content-Type and Content-Encoding headers on any route get a 4xx with a message or an answer, never a 5xx', async () => {
    // Real tokens too, so the lies in the other headers reach past the sign-in.
    const tokensOf = () => ({ admin: admin.token, supervisor: crew.supervisor.token, rigger: crew.rigger.token });
    let signingOut: SignedInUser | undefined;
    const headerText = fc.oneof(
      fc.string({ unit: fc.integer({ min: 0x20, max: 0x7e }).map((c) => String.fromCharCode(c)), maxLength: 200 }),
      fc.constantFrom(...Object.values(tokensOf())).map((token) => `Bearer ${token}`),
      fc.constantFrom('Bearer', 'Bearer ', 'Bearer a.b.c', 'Bearer eyJhbGciOiJub25lIn0.eyJzdWIiOiJ4In0.', `Bearer ${'a'.repeat(8_000)}`, 'Basic YTpi', 'bearer x'),
    );
    const cookieText = fc.oneof(
      fc.string({ unit: fc.integer({ min: 0x21, max: 0x7e }).map((c) => String.fromCharCode(c)), maxLength: 120 }).map((v) => `holdline_refresh=${v}`),
      fc.constantFrom('holdline_refresh=%ZZ', 'holdline_refresh=j:{"__proto__":1}', 'holdline_refresh=', '=;=;;', `holdline_refresh=${'x'.repeat(4_000)}`),
    );
    await fc.assert(
      fc.asyncProperty(
        fc.constantFrom(...routes.filter(({ route }) => !/\.(pdf|zip)$/.test(route))),
        fc.option(headerText),
        fc.option(cookieText),
        // The body stays plain JSON: what it claims to be compressed with is the lie.
        fc.option(fc.constantFrom('gzip', 'deflate', 'br', 'identity', 'x-unknown', 'gzip, br', '')),
        fc.constantFrom(
          'application/json',
          'application/json; charset=latin1',
          'application/json; charset=utf-16',
          'application/json; charset=utf-7',
          'application/vnd.api+json',
          'text/plain',
          'application/x-www-form-urlencoded',
          'multipart/form-data; boundary=x',
          'multipart/form-data',
        ),
        async ({ route }, authorization, cookie, encoding, contentType) => {
          const before = await snapshot();
          const [method, pattern] = route.split(' ') as [string, string];
          let req = request(server.app)[method.toLowerCase() as 'get' | 'post' | 'put' | 'patch'](fillPath(pattern));
          // Signing out with a real access token ends its session: the sign-out route gets a sign-in of its own.
          const sent = authorization;
          if (route === 'POST /api/auth/logout' && sent && Object.values(tokensOf()).some((t) => sent.includes(t))) authorization = `Bearer ${(signingOut ??= await signedInUser(server)).token}`;
          if (authorization !== null) req = req.set('Authorization', authorization);
          if (cookie !== null) req = req.set('Cookie', cookie);
          if (method !== 'GET') req = req.set('Content-Type', contentType);
          if (encoding !== null && method !== 'GET') req = req.set('Content-Encoding', encoding);
          const res = method === 'GET' ? await req : await req.send('{"a":1}');
          expect(res.status, `${route} ${authorization?.slice(0, 80)} ${cookie?.slice(0, 80)}: ${res.text?.slice(0, 200)}`).toBeLessThan(500);
          if (res.status >= 400) {
            expectErrorShape(res.status, res.body, route);
            expect(await snapshot()).toEqual(before);
          }
        },
      ),
      { numRuns: 40 * RUNS },
    );
  });

  it('accepted hostile bodies only where a route reads no body or never tells', () => {
    // Printed for the reviewer: how often each such route said yes.
    console.info('2xx answers to hostile bodies:', Object.fromEntries(accepted));
    expect([...accepted.keys()].filter((r) => !(r in acceptsAnyBody))).toEqual([]);
  });

  describe('socket events', () => {
    const sockets: Socket[] = [];
    afterAll(() => {
      for (const s of sockets) s.close();
    });
    /** A fresh socket per property: each has its own rate bucket, so the flood limit does not mask the handlers. */
    async function socketOf(who: SignedInUser): Promise<Socket> {
      const s = connect(server.url, { transports: ['websocket'], auth: { token: who.token }, reconnection: false, forceNew: true });
      sockets.push(s);
      await new Promise<void>((resolve, reject) => {
        s.once('connect', () => resolve());
        s.once('connect_error', reject);
      });
      return s;
    }

    const events = (policyTable as readonly PolicyRow[]).flatMap((row) => row.events ?? []).filter((e) => e !== 'connect');
    // board:leave is the one event without an acknowledgment; it is sent below without waiting for one.
    const answered = events.filter((e) => e !== 'board:leave');

    it('lists the socket events the policy table names', () => {
      expect(events).toEqual(expect.arrayContaining(['board:command', 'board:join', 'jobs:follow', 'session:renew', 'board:leave']));
    });

    it.each(answered)('%s: hostile payloads are answered ok:false with a message, never crash, and change nothing', async (event) => {
      const s = await socketOf(crew.supervisor);
      await fc.assert(
        fc.asyncProperty(socketValue(Object.values(ids)), fc.boolean(), async (payload, wrapInCommand) => {
          const before = await snapshot();
          // A board command's hostile part is as often the command inside a well-formed envelope.
          const sent = event === 'board:command' && wrapInCommand ? { jobId, command: payload } : payload;
          const answer = (await s.timeout(5000).emitWithAck(event, sent)) as { ok?: unknown; error?: { code?: unknown; message?: unknown } };
          if (answer?.ok !== true) {
            expect(answer?.ok, `${event} ${JSON.stringify(sent).slice(0, 300)}`).toBe(false);
            expect(typeof answer.error?.code).toBe('string');
            expect(typeof answer.error?.message === 'string' && answer.error.message.length > 0).toBe(true);
            expect(answer.error?.code).not.toBe('internal');
          } else {
            // Only reads may say yes: a join or a follow of the job this person is on.
            expect(['board:join', 'jobs:follow'], `${event} accepted ${JSON.stringify(sent).slice(0, 300)}`).toContain(event);
          }
          expect(await snapshot()).toEqual(before);
        }),
        // Under one socket's burst, so each message reaches its handler.
        { numRuns: 30 },
      );
      expect(s.connected).toBe(true);
    });

    it('board:leave and every other event, sent without an acknowledgment or with odd arguments, leave the socket and the server working', async () => {
      const s = await socketOf(crew.rigger);
      const before = await snapshot();
      const odd: unknown[][] = [[], [null], [undefined], [42], ['text'], [{ jobId }, 'extra', 7], [Buffer.from('binary payload')], [{ jobId: [jobId] }], [JSON.parse('{"__proto__":{"x":1}}')]];
      for (const event of [...events, 'no:such:event']) for (const args of odd) s.emit(event, ...(args as []));
      for (const payload of fc.sample(hostileValue(Object.values(ids)), 15)) s.emit('board:leave', payload);
      // Past this socket's burst by now: wait for its bucket to refill a little.
      await new Promise((r) => setTimeout(r, 300));
      // Still answering, and its own answers still come.
      const answer = (await s.timeout(5000).emitWithAck('board:join', { jobId })) as { ok: boolean; error?: { code: string } };
      expect(answer.ok || answer.error?.code === 'too_many_commands').toBe(true);
      expect(s.connected).toBe(true);
      expect(await snapshot()).toEqual(before);
      await request(server.app).get('/api/health').expect(200);
    });

    it('hostile handshakes are refused with a message', async () => {
      await fc.assert(
        fc.asyncProperty(hostileValue(Object.values(ids)), async (auth) => {
          const s = connect(server.url, { transports: ['websocket'], auth: { token: auth } as Record<string, unknown>, reconnection: false, forceNew: true });
          try {
            const error = await new Promise<Error>((resolve, reject) => {
              s.once('connect', () => reject(new Error(`connected with ${JSON.stringify(auth)}`)));
              s.once('connect_error', resolve);
            });
            expect(error.message.length).toBeGreaterThan(0);
          } finally {
            s.close();
          }
        }),
        { numRuns: 15 * RUNS },
      );
    });
  });

  it('the server answers its health route and a real command after everything above, and every job’s log still verifies', async () => {
    await request(server.app).get('/api/health').expect(200);
    const jobs = (await server.context.dataSource.manager.query('SELECT id FROM job')) as { id: string }[];
    for (const { id } of jobs) {
      const verify = await request(server.app).get(`/api/jobs/${id}/record/verify`).set('Authorization', `Bearer ${admin.token}`).expect(200);
      expect(verify.body.valid, id).toBe(true);
    }
    const answer = await httpCommand(server, crew.rigger, jobId, { type: 'weather.record', meanMs: 3, gustMs: 5, heightM: 10 });
    expect(answer.status, JSON.stringify(answer.body)).toBe(200);
  });
});
