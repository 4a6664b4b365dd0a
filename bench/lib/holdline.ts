import { randomUUID } from 'node:crypto';
import { cpSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { ChildServer } from '../../tests/helpers/child-server.js';
import { cachedDir, hashOf } from './cache.js';
import { GC_NODE_ARGS } from './crowd-memory.js';
import type { BenchServer, CommandPayload } from './types.js';

/** Every demo account's password (server/demo/people.ts). */
const DEMO_PASSWORD = 'holdline-demo';
/** Sockets are refused over the default 20 messages a second per socket and per person: the bench measures the command path, not that limit. */
export const BENCH_COMMAND_RATE = '100000';
/** People who send `weather.record` on the bench board (crew roles allowed to: supervisor, operator, signaller, rigger). */
const COMMANDERS = ['signaller@holdline.test', 'rigger@holdline.test', 'rigger2@holdline.test', 'operator@holdline.test'];
/** People who may watch the bench board (its crew, viewers and planners alike, and an administrator). */
const WATCHERS = [
  'viewer@holdline.test',
  'rigger@holdline.test',
  'rigger2@holdline.test',
  'signaller@holdline.test',
  'operator@holdline.test',
  'supervisor@holdline.test',
  'supervisor2@holdline.test',
  'admin@holdline.test',
];
const IDLE_BOARDS = 9;

export interface HoldlineOptions {
  /** Checkout whose server runs (default: this one; env BENCH_HOLDLINE_ROOT), for before/after numbers under the same swarm. */
  root?: string;
  /** Extra environment for the server process. */
  env?: Record<string, string>;
}

/** A seeded data folder to copy for each start, and the boards the bench uses in it. */
export interface Template {
  dir: string;
  boardJobId: string;
  idleJobIds: string[];
  /** Seconds the seeding took in this run; null when an earlier run's template was reused. */
  seededSeconds: number | null;
}

const TEMPLATE_META = 'bench-template.json';
/** What the seeded data depends on: the server (schema, seed, the routes the fixture calls), the shared code, the packages. */
const TEMPLATE_INPUTS = ['server', 'shared', 'package-lock.json'];
/**
 * The demo is seeded relative to the moment it was made ("started this morning", shifts of
 * today): a template is kept for the day it was made on and at most this long.
 */
const TEMPLATE_MAX_AGE_MS = 6 * 60 * 60 * 1000;
const repoRoot = path.resolve(import.meta.dirname, '..', '..');

/** One seeded database per checkout and inputs, kept between runs: the demo seed takes seconds, a copy milliseconds. */
const templates = new Map<string, Promise<Template>>();
const madeDirs: string[] = [];
process.once('exit', () => {
  for (const dir of madeDirs) rmSync(dir, { recursive: true, force: true });
});

interface Answer {
  status: number;
  body: Record<string, unknown> | null;
}

/** A JSON call to a child server as a browser page of its own origin makes it. */
async function call(url: string, method: string, route: string, token: string | null, body?: unknown): Promise<Answer> {
  const res = await fetch(`${url}${route}`, {
    method,
    headers: { 'content-type': 'application/json', origin: url, ...(token ? { authorization: `Bearer ${token}` } : {}) },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  const text = await res.text();
  return { status: res.status, body: text ? (JSON.parse(text) as Record<string, unknown>) : null };
}

async function must(answer: Promise<Answer>, what: string): Promise<Record<string, unknown>> {
  const a = await answer;
  if (a.status >= 300 || !a.body) throw new Error(`bench fixture: ${what} answered ${a.status} ${JSON.stringify(a.body)}`);
  return a.body;
}

/** Signs a demo account in (once per account: sign-in is throttled after failures, and bcrypt is slow). */
async function signIn(url: string, email: string): Promise<string> {
  const body = await must(call(url, 'POST', '/api/auth/login', null, { email, password: DEMO_PASSWORD }), `sign-in of ${email}`);
  return body.token as string;
}

interface JobLine {
  id: string;
  name: string;
  state: string;
}

/**
 * Seeds the demo into `dir`, picks its live board that the demo's read-only viewer watches, and
 * adds nine more started boards with the same crew, configuration and radio plan that nobody
 * sends to. The server is stopped with SIGTERM so the file is checkpointed and whole.
 */
async function seedTemplate(dir: string, root: string | undefined): Promise<void> {
  const server = await ChildServer.start({ dataDir: dir, root, env: { HOLDLINE_DEMO: '1', HOLDLINE_COMMAND_RATE: BENCH_COMMAND_RATE }, bootTimeoutMs: 180_000 });
  try {
    const { url } = server;
    const supervisor = await signIn(url, 'supervisor@holdline.test');
    const lines = (await must(call(url, 'GET', '/api/jobs', supervisor), 'job list')).items as JobLine[];
    const board = lines.find((j) => j.state === 'live' && j.name.startsWith('Transformer')) ?? lines.find((j) => j.state === 'live');
    if (!board) throw new Error('bench fixture: the demo has no live job');
    const job = (await must(call(url, 'GET', `/api/jobs/${board.id}`, supervisor), 'the live job')).job as Record<string, unknown>;
    const crew = (job.crew as { userId: string; role: string }[]).map((m) => ({ userId: m.userId, role: m.role }));
    // The nine boards side by side: each is a handful of calls in order, independent of the others.
    const idleJobIds = await Promise.all(
      Array.from({ length: IDLE_BOARDS }, async (_, i) => {
        const created = await must(
          call(url, 'POST', '/api/jobs', supervisor, { name: `Bench idle board ${i + 1}`, site: 'Bench yard', craneUnitId: job.craneUnitId, kind: 'erection' }),
          'an idle job',
        );
        const id = (created.job as { id: string }).id;
        await must(call(url, 'PUT', `/api/jobs/${id}/crew`, supervisor, { members: crew }), 'its crew');
        await must(call(url, 'PATCH', `/api/jobs/${id}`, supervisor, { commsPlan: job.commsPlan }), 'its radio plan');
        await must(call(url, 'PUT', `/api/jobs/${id}/configuration`, supervisor, job.configuration), 'its configuration');
        await must(call(url, 'POST', `/api/jobs/${id}/ready`, supervisor, {}), 'making it ready');
        await must(call(url, 'POST', `/api/jobs/${id}/commands`, supervisor, { type: 'job.start', commandId: randomUUID() }), 'starting it');
        return id;
      }),
    );
    writeFileSync(path.join(dir, TEMPLATE_META), JSON.stringify({ boardJobId: board.id, idleJobIds }));
  } finally {
    await server.terminate();
  }
}

/** The cached template for a checkout, seeded when its server, shared code or packages changed, or on a new day. */
async function makeTemplate(root: string | undefined): Promise<Template> {
  const checkout = root ?? repoRoot;
  const key = `${hashOf(checkout, TEMPLATE_INPUTS)}-${new Date().toISOString().slice(0, 10)}`;
  const entry = await cachedDir('template', key, (dir) => seedTemplate(dir, root), TEMPLATE_MAX_AGE_MS);
  const meta = JSON.parse(readFileSync(path.join(entry.dir, TEMPLATE_META), 'utf8')) as { boardJobId: string; idleJobIds: string[] };
  return { dir: entry.dir, boardJobId: meta.boardJobId, idleJobIds: meta.idleJobIds, seededSeconds: entry.seconds };
}

/** The seeded template this run uses for `root` (made once per run at most; reused between runs while its inputs are unchanged). */
export function templateFor(root: string | undefined = process.env.BENCH_HOLDLINE_ROOT ?? undefined): Promise<Template> {
  const key = root ?? '';
  let template = templates.get(key);
  if (!template) {
    template = makeTemplate(root);
    // A failed seed is not kept: the next start tries again.
    template.catch(() => templates.delete(key));
    templates.set(key, template);
  }
  return template;
}

/**
 * The real Holdline server in a child process on a copy of the bench's seeded database: one live
 * board that commanders send `weather.record` to, nine idle boards, tokens of crew who may watch.
 */
export async function startHoldline(options: HoldlineOptions = {}): Promise<BenchServer> {
  const root = options.root ?? process.env.BENCH_HOLDLINE_ROOT ?? undefined;
  const template = await templateFor(root);
  const dataDir = mkdtempSync(path.join(os.tmpdir(), 'holdline-bench-'));
  madeDirs.push(dataDir);
  // The whole folder: the demo's uploads (photos, plans) live beside the database.
  cpSync(template.dir, dataDir, { recursive: true });
  const server = await ChildServer.start({ dataDir, root, nodeArgs: GC_NODE_ARGS, env: { HOLDLINE_COMMAND_RATE: BENCH_COMMAND_RATE, ...options.env } });
  try {
    const emails = [...new Set([...COMMANDERS, ...WATCHERS])];
    const tokens = new Map((await Promise.all(emails.map((email) => signIn(server.url, email)))).map((token, i) => [emails[i], token]));
    const commanderTokens = COMMANDERS.map((e) => tokens.get(e)!);
    const viewerTokens = WATCHERS.map((e) => tokens.get(e)!);
    return {
      system: 'holdline',
      url: server.url,
      pid: () => {
        if (server.pid === undefined) throw new Error('the Holdline server is not running');
        return server.pid;
      },
      boardJobId: template.boardJobId,
      idleJobIds: template.idleJobIds,
      commanderTokens,
      viewerTokens,
      command: (i: number): CommandPayload => ({
        jobId: template.boardJobId,
        // Calm readings that vary a little, well inside the demo crane's limits.
        command: { type: 'weather.record', commandId: randomUUID(), meanMs: 3 + (i % 10) / 10, gustMs: 5 + (i % 7) / 10, heightM: 10 },
      }),
      restart: () => server.restart(),
      stop: () => server.stop(),
    };
  } catch (error) {
    await server.stop();
    throw error;
  }
}
