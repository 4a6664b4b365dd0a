import { spawn, type ChildProcess } from 'node:child_process';
import { randomUUID } from 'node:crypto';
import path from 'node:path';
import Database from 'better-sqlite3';
import { io as connect, type Socket } from 'socket.io-client';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BoardFollower } from '../../shared/board/follower.js';
import { jobEventListSchema, type JobEventDto } from '../../shared/events/log.js';
import type { ClientToServerEvents, CommandAnswer, ServerToClientEvents } from '../../shared/events/socket.js';
import type { BoardCommand } from '../../shared/schemas/commands.js';
import { healthSchema } from '../../shared/schemas/health.js';
import { createApp, type HoldlineApp } from '../../server/app.js';
import { loadConfig } from '../../server/config.js';
import { openDatabase } from '../../server/db/data-source.js';
import { createLogger } from '../../server/logger.js';
import { BoardClient, calmWeather, httpCommand, startedJob, type CrewByRole } from '../helpers/board.js';
import { freePort } from '../helpers/child-server.js';
import { startTestServer, type TestServer } from '../helpers/server.js';

const root = path.resolve(import.meta.dirname, '..', '..');
/** The secret of the in-process server that prepared the job: the child signs and checks tokens with it too. */
const SECRET = 'test-secret-test-secret-test-secret-0123456789';


/** The real server (`node --import tsx server/index.ts`) as a child process on the prepared file. */
async function bootChild(dataDir: string, port: number): Promise<{ child: ChildProcess; exited: Promise<number | null>; output: () => string }> {
  const url = `http://127.0.0.1:${port}`;
  const child = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    cwd: root,
    env: { ...process.env, PORT: String(port), HOLDLINE_DB: path.join(dataDir, 'holdline.sqlite'), HOLDLINE_DEMO: '0', HOLDLINE_SECRET: SECRET, HOLDLINE_PUBLIC_URL: url, LOG_LEVEL: 'warn' },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let out = '';
  child.stdout?.on('data', (d: Buffer) => (out += d.toString()));
  child.stderr?.on('data', (d: Buffer) => (out += d.toString()));
  const exited = new Promise<number | null>((resolve) => child.once('exit', (code) => resolve(code)));
  let gone = false;
  void exited.then(() => (gone = true));
  const until = Date.now() + 30_000;
  for (;;) {
    if (gone) throw new Error(`the server exited while starting:\n${out}`);
    const answered = await fetch(`${url}/api/health`, { signal: AbortSignal.timeout(1000) }).then((r) => r.status, () => 0);
    if (answered === 200) return { child, exited, output: () => out };
    if (Date.now() > until) {
      child.kill('SIGKILL');
      throw new Error(`the server did not answer:\n${out}`);
    }
    await new Promise((r) => setTimeout(r, 100));
  }
}

/** The restart, in this process on the same file and port (a second child would cost another slow boot). */
async function restartInProcess(dataDir: string, port: number): Promise<HoldlineApp> {
  const config = loadConfig({
    PORT: String(port),
    HOLDLINE_DB: path.join(dataDir, 'holdline.sqlite'),
    HOLDLINE_DEMO: '0',
    HOLDLINE_SECRET: SECRET,
    HOLDLINE_PUBLIC_URL: `http://127.0.0.1:${port}`,
    LOG_LEVEL: 'silent',
  });
  const holdline = createApp({ config, dataSource: await openDatabase(config.databasePath), logger: createLogger(config.logLevel) });
  await new Promise<void>((resolve, reject) => {
    holdline.httpServer.once('error', reject);
    holdline.httpServer.listen(port, '127.0.0.1', resolve);
  });
  return holdline;
}

interface Sent {
  commandId: string;
  /** When it was sent: one sent before SIGTERM was in flight when the shutdown began. */
  sentAt: number;
  answer?: CommandAnswer | 'no answer';
}

describe('graceful shutdown', () => {
  let server: TestServer;
  let crew: CrewByRole;
  let jobId: string;

  beforeAll(async () => {
    server = await startTestServer({ env: { HOLDLINE_SECRET: SECRET } });
    ({ crew, jobId } = await startedJob(server));
  }, 60_000);
  afterAll(() => server.stop());

  it('refuses new commands with server_restarting, tells the boards, and lets a queued command commit and be answered', async () => {
    const client = new BoardClient(server.url, crew.rigger.token);
    let notice: { at: string } | null = null;
    client.socket.on('server:restarting', (payload) => (notice = payload));
    expect(await client.join(jobId)).toMatchObject({ ok: true });
    const seqBefore = (await httpCommand(server, crew.rigger, jobId, calmWeather)).body.seq!;

    // Something slow holds the queue, so the next command waits in it when shutdown begins.
    let letGo: () => void = () => {};
    const held = server.context.queue.run(() => new Promise<void>((resolve) => (letGo = resolve)));
    const queued = client.command(jobId, calmWeather);
    while (server.context.queue.size < 2) await new Promise((r) => setTimeout(r, 5));

    const closed = server.close();
    while (server.context.queue.isAccepting) await new Promise((r) => setTimeout(r, 5));
    // Shutdown has begun: a new command over either transport is refused, and nothing more is written.
    const late = await client.command(jobId, calmWeather);
    expect(late).toMatchObject({ ok: false, error: { code: 'server_restarting' } });
    if (!late.ok) expect(late.error.message).toMatch(/restarting: this was not recorded/);
    const healthNow = await request(server.app).get('/api/health');
    expect(healthNow.status).toBe(503);
    expect(healthSchema.parse(healthNow.body).status).toBe('restarting');
    expect(notice).not.toBeNull();
    // Over HTTP the job is read in the queue's turn first, so this one waits behind the held work.
    const lateHttp = httpCommand(server, crew.rigger, jobId, calmWeather);

    // The command queued before shutdown commits and its sender hears ok before the socket closes.
    letGo();
    await held;
    expect(await queued).toMatchObject({ ok: true, seq: seqBefore + 1 });
    const refusedHttp = await lateHttp;
    expect(refusedHttp.status).toBe(503);
    expect(refusedHttp.body.error?.code).toBe('server_restarting');
    await closed;
    const db = new Database(path.join(server.dataDir, 'holdline.sqlite'), { readonly: true });
    expect((db.prepare('SELECT MAX(seq) AS n FROM job_event WHERE job_id = ?').get(jobId) as { n: number }).n).toBe(seqBefore + 1);
    db.close();
    client.close();
  });

  it('on SIGTERM under load, the real process: every acknowledged command is in the log after the restart, every other one refused, and the boards catch up by themselves', { timeout: 120_000 }, async () => {
    const port = await freePort();
    const url = `http://127.0.0.1:${port}`;
    const run = await bootChild(server.dataDir, port);
    const senders = [crew.rigger, crew.operator, crew.signaller];
    const sockets = senders.map(
      (who) =>
        connect(url, { transports: ['websocket'], auth: { token: who.token }, forceNew: true, reconnectionDelay: 100, reconnectionDelayMax: 300 }) as Socket<ServerToClientEvents, ClientToServerEvents>,
    );
    const heardNotice = sockets.map(() => false);
    const reconnects = sockets.map(() => 0);
    const followers = sockets.map((socket, i) => {
      const follower = new BoardFollower(jobId, {
        join: (id, afterSeq) => socket.timeout(5000).emitWithAck('board:join', afterSeq === undefined ? { jobId: id } : { jobId: id, afterSeq }),
        fetchEvents: async (id, afterSeq) =>
          jobEventListSchema.parse(await (await fetch(`${url}/api/jobs/${id}/events?after=${afterSeq}`, { headers: { Authorization: `Bearer ${senders[i]!.token}` } })).json()).items,
      });
      socket.on('board:event', (e: JobEventDto) => follower.onEvent(e));
      socket.on('board:tick', (t) => follower.onTick(t));
      socket.on('disconnect', () => follower.onDisconnect());
      socket.on('server:restarting', () => (heardNotice[i] = true));
      // The client's own way back: on every reconnect, join again from the last seq it holds.
      socket.on('connect', () => {
        reconnects[i]! += 1;
        if (reconnects[i]! > 1) void follower.join().catch(() => undefined);
      });
      return follower;
    });
    await Promise.all(sockets.map((s) => new Promise<void>((resolve) => (s.connected ? resolve() : s.once('connect', () => resolve())))));
    await Promise.all(followers.map((f) => f.join()));

    // Each client keeps four commands in flight until it hears the notice.
    const sent: Sent[][] = sockets.map(() => []);
    let acknowledged = 0;
    const loops = sockets.map((socket, i) =>
      Promise.all(
        [0, 1, 2, 3].map(async () => {
          while (!heardNotice[i] && socket.connected) {
            const entry: Sent = { commandId: randomUUID(), sentAt: Date.now() };
            sent[i]!.push(entry);
            const answer = await socket
              .timeout(10_000)
              .emitWithAck('board:command', { jobId, command: { ...calmWeather, commandId: entry.commandId } as BoardCommand })
              .catch(() => 'no answer' as const);
            entry.answer = answer;
            if (answer !== 'no answer' && answer.ok) acknowledged += 1;
          }
        }),
      ),
    );
    // HTTP commands one after another, not listening for the notice: they meet the refusal or a closed door.
    const httpSent: { commandId: string; status: number | 'no response'; code?: string }[] = [];
    let httpGoing = true;
    const httpLoop = (async () => {
      while (httpGoing) {
        const commandId = randomUUID();
        try {
          const res = await fetch(`${url}/api/jobs/${jobId}/commands`, {
            method: 'POST',
            headers: { Authorization: `Bearer ${crew.supervisor.token}`, 'Content-Type': 'application/json' },
            body: JSON.stringify({ ...calmWeather, commandId }),
            signal: AbortSignal.timeout(10_000),
          });
          const body = (await res.json()) as { error?: { code: string } };
          httpSent.push({ commandId, status: res.status, code: body.error?.code });
        } catch {
          httpSent.push({ commandId, status: 'no response' });
          await new Promise((r) => setTimeout(r, 50));
        }
      }
    })();

    while (acknowledged < 30) await new Promise((r) => setTimeout(r, 10));
    const ackedBeforeSigterm = acknowledged;
    const sigtermAt = Date.now();
    run.child.kill('SIGTERM');
    expect(await run.exited, run.output()).toBe(0);
    await Promise.all(loops);

    // Every socket heard that the server restarts, and every command in flight at SIGTERM was
    // answered: ok, or refused server_restarting, never anything else and never silence. One sent
    // after SIGTERM, before its sender heard the notice, may meet a closed socket instead.
    expect(heardNotice).toEqual([true, true, true]);
    const all = sent.flat();
    for (const entry of all) {
      if (entry.answer === 'no answer') continue;
      if (!entry.answer!.ok) expect(entry.answer!.error.code).toBe('server_restarting');
    }
    expect(all.filter((e) => e.sentAt < sigtermAt && e.answer === 'no answer')).toEqual([]);
    for (const h of httpSent) expect([200, 503, 'no response']).toContain(h.status);
    for (const h of httpSent.filter((x) => x.status === 503)) expect(h.code).toBe('server_restarting');

    // Back up on the same file and port: the boards reconnect and rejoin by themselves.
    const restarted = await restartInProcess(server.dataDir, port);
    httpGoing = false;
    await httpLoop;
    const until = Date.now() + 15_000;
    while (reconnects.some((n) => n < 2) || followers.some((f) => !f.live)) {
      if (Date.now() > until) throw new Error(`not back: reconnects ${reconnects.join(',')}, live ${followers.map((f) => f.live).join(',')}`);
      await new Promise((r) => setTimeout(r, 50));
    }

    // Every acknowledged command is in the log exactly once; no refused one is; seqs run without a gap.
    const db = new Database(path.join(server.dataDir, 'holdline.sqlite'), { readonly: true });
    const rows = db.prepare('SELECT seq, command_id AS commandId FROM job_event WHERE job_id = ? ORDER BY seq').all(jobId) as { seq: number; commandId: string }[];
    db.close();
    expect(rows.map((r) => r.seq)).toEqual(rows.map((_r, i) => i + 1));
    const logged = new Map<string, number>();
    for (const r of rows) logged.set(r.commandId, (logged.get(r.commandId) ?? 0) + 1);
    const okIds = [...all.filter((e) => e.answer !== 'no answer' && e.answer?.ok).map((e) => e.commandId), ...httpSent.filter((h) => h.status === 200).map((h) => h.commandId)];
    const refusedIds = [...all.filter((e) => e.answer !== 'no answer' && e.answer && !e.answer.ok).map((e) => e.commandId), ...httpSent.filter((h) => h.status === 503).map((h) => h.commandId)];
    expect(okIds.length).toBeGreaterThanOrEqual(30);
    expect(okIds.filter((id) => logged.get(id) !== 1)).toEqual([]);
    expect(refusedIds.filter((id) => logged.has(id))).toEqual([]);
    const chain = await (await fetch(`${url}/api/jobs/${jobId}/record/verify`, { headers: { Authorization: `Bearer ${crew.supervisor.token}` } })).json();
    expect(chain).toMatchObject({ valid: true, checked: rows.length });
    console.info(
      `shutdown under load: ${ackedBeforeSigterm} socket commands acknowledged before SIGTERM, ${okIds.length} acknowledged in all and found once each; ` +
        `${refusedIds.length} refused server_restarting; ${all.filter((e) => e.answer === 'no answer').length} sent after SIGTERM went unanswered`,
    );

    // Each board now holds exactly the server's board: caught up with no gap and no duplicate.
    for (const [i, follower] of followers.entries()) {
      const current = (await (await fetch(`${url}/api/jobs/${jobId}/board`, { headers: { Authorization: `Bearer ${senders[i]!.token}` } })).json()) as { presence: unknown };
      const { presence: _p, ...theirs } = current;
      const { presence: _mine, ...mine } = follower.board!;
      expect(mine).toEqual(theirs);
    }
    for (const s of sockets) s.close();
    await restarted.close();
  });
});
