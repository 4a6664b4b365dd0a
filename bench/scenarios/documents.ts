/**
 * Scenario 6, documents: a board command's answer time (send → ack over a socket, from this
 * process) at rest and while three record PDFs render at once, rounds alternating rest and render.
 *
 * Holdline runs as a child process on a copy of the seeded demo. The commands go to the live
 * pump-house board (weather readings by its signaller, paced at 10/s, sent on a clock rather than
 * after each answer, so a stalled server shows its whole stall); the three PDFs are the record of
 * the live 60 m transformer-lift erection, asked for by three of its crew. A live job's record is
 * never cached (server/routes/record-pdf.ts caches finished jobs only), so every request renders,
 * and no command touches that job, so every round renders the same log. The baseline is Holdline
 * itself at rest (`holdline-at-rest`): the relays have no documents to render.
 */
import { randomUUID } from 'node:crypto';
import { readFileSync } from 'node:fs';
import os from 'node:os';
import { performance } from 'node:perf_hooks';
import { io, type Socket } from 'socket.io-client';
import type { JobEventDto } from '../../shared/events/log.js';
import type { ClientToServerEvents, ServerToClientEvents } from '../../shared/events/socket.js';
import type { BoardCommand } from '../../shared/schemas/commands.js';
import { DEMO_PASSWORD } from '../../server/demo/people.js';
import { BENCH_COMMAND_RATE, startHoldline } from '../lib/holdline.js';
import { clockTicks, cpuMs } from '../lib/proc.js';
import { percentile, ratioOf, spreadOf } from '../lib/stats.js';
import type { Correctness, Figure, Scenario, ScenarioResult } from '../lib/types.js';

/** The demo job whose board takes the commands, and the one whose record is rendered. */
const BOARD_JOB = 'Pump house roof lift: boom erection';
const RECORD_JOB = 'Transformer T2 lift: boom erection';
/** Who asks for the three records: a planner, a crew member, the client's read-only engineer. */
const RECORD_READERS = ['supervisor@holdline.test', 'signaller@holdline.test', 'viewer@holdline.test'];
/** Sends the board commands: on the pump-house crew, briefed, may record the wind. */
const COMMANDER = 'signaller@holdline.test';

/** Commands a second, as a busy crew might send them. */
const RATE_HZ = 10;
/** An answer later than this counts as lost. */
const ACK_TIMEOUT_MS = 15_000;
/** The target from the issue: the answer while rendering at most this many times the answer at rest. */
const TARGET_RATIO = 1.5;

type BoardSocket = Socket<ServerToClientEvents, ClientToServerEvents>;

interface Sample {
  /** Send → ack, ms (null: no answer within ACK_TIMEOUT_MS). */
  ms: number | null;
  ok: boolean;
  code?: string;
  event?: JobEventDto;
}

interface Render {
  ms: number;
  ok: boolean;
  status: number;
  bytes: number;
}

/** CPU time (user + system, ms) of a process's main thread alone, the one that runs the event loop: its task id is the pid. */
function mainThreadCpuMs(pid: number): number {
  const text = readFileSync(`/proc/${pid}/task/${pid}/stat`, 'utf8');
  const fields = text.slice(text.lastIndexOf(')') + 2).split(' ');
  // After "pid (comm) " the state is field 3; utime and stime are fields 14 and 15.
  return ((Number(fields[14 - 3]) + Number(fields[15 - 3])) * 1000) / clockTicks();
}

/** The server's CPU so far, all threads and the event loop's thread alone. */
function cpuOf(pid: number): { total: number; main: number } {
  return { total: cpuMs(pid), main: mainThreadCpuMs(pid) };
}

const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

async function signIn(url: string, email: string): Promise<string> {
  const res = await fetch(`${url}/api/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin: url },
    body: JSON.stringify({ email, password: DEMO_PASSWORD }),
  });
  const body = (await res.json()) as { token?: string };
  if (res.status !== 200 || !body.token) throw new Error(`documents: sign-in of ${email} answered ${res.status}`);
  return body.token;
}

async function getJson<T>(url: string, token: string): Promise<T> {
  const res = await fetch(url, { headers: { authorization: `Bearer ${token}` } });
  if (res.status !== 200) throw new Error(`documents: GET ${url} answered ${res.status}`);
  return (await res.json()) as T;
}

/** Every event of a job after a seq, page by page. */
async function eventsAfter(url: string, token: string, jobId: string, after: number): Promise<JobEventDto[]> {
  const events: JobEventDto[] = [];
  for (let from = after; ; ) {
    const page = await getJson<{ items: JobEventDto[]; lastSeq: number }>(`${url}/api/jobs/${jobId}/events?after=${from}`, token);
    events.push(...page.items);
    if (!page.items.length || page.items[page.items.length - 1].seq >= page.lastSeq) return events;
    from = page.items[page.items.length - 1].seq;
  }
}

async function renderRecord(url: string, token: string, jobId: string): Promise<Render> {
  const started = performance.now();
  const res = await fetch(`${url}/api/jobs/${jobId}/record.pdf`, { headers: { authorization: `Bearer ${token}` } });
  const body = Buffer.from(await res.arrayBuffer());
  return { ms: performance.now() - started, ok: res.status === 200 && body.subarray(0, 5).toString() === '%PDF-', status: res.status, bytes: body.length };
}

/** One weather reading, as a legal command that can be repeated without end. */
function weatherCommand(): BoardCommand {
  return { type: 'weather.record', commandId: randomUUID(), meanMs: 4, gustMs: 7, heightM: 10 };
}

async function sendOne(socket: BoardSocket, jobId: string): Promise<Sample> {
  const sent = performance.now();
  try {
    const answer = await socket.timeout(ACK_TIMEOUT_MS).emitWithAck('board:command', { jobId, command: weatherCommand() });
    const ms = performance.now() - sent;
    return answer.ok ? { ms, ok: true, event: answer.event } : { ms, ok: false, code: answer.error.code };
  } catch {
    return { ms: null, ok: false, code: 'no_answer' };
  }
}

/**
 * Commands on a clock, RATE_HZ a second, while `going()` holds (checked before each send), then
 * waits for every answer. Sent on the clock rather than after each answer: a server that stalls
 * gets the commands a crew would have sent meanwhile, and each one's wait is counted.
 */
async function paced(socket: BoardSocket, jobId: string, going: () => boolean): Promise<Sample[]> {
  const period = 1000 / RATE_HZ;
  const start = performance.now();
  const pending: Promise<Sample>[] = [];
  for (let k = 0; going(); k++) {
    const due = start + k * period - performance.now();
    if (due > 0) await sleep(due);
    if (!going()) break;
    pending.push(sendOne(socket, jobId));
  }
  return Promise.all(pending);
}

/** What one round measured. */
interface Round {
  rest: number[];
  render: number[];
  pdfAllMs: number;
  pdfs: Render[];
  /**
   * Server CPU per record PDF (ms): the render phase's CPU less what its commands cost at rest
   * (the rest phase's CPU per command times the commands sent), over the three PDFs.
   */
  pdfCpu: { total: number; main: number };
}

function answered(samples: Sample[]): number[] {
  return samples.flatMap((s) => (s.ok && s.ms !== null ? [s.ms] : []));
}

/** Scenario 6: a board command's answer time while three record PDFs render, against at rest. */
export const documents: Scenario = async ({ quick, log }) => {
  const rounds = quick ? 1 : 3;
  const restMs = quick ? 1500 : 2000;
  const correctness: Correctness = { gaps: 0, duplicates: 0, lostAcks: 0, rejected: 0 };
  const notes: string[] = [];
  if (quick) notes.push(`quick: one round (full: three), ${restMs / 1000} s at rest per round`);

  const bootStarted = performance.now();
  // A copy of the bench's seeded demo (seeded once per bench run, on the first start), with the
  // command rate far above what is sent: the scenario measures the command path, not the limit.
  const server = await startHoldline();
  log(`documents: Holdline up in ${((performance.now() - bootStarted) / 1000).toFixed(1)} s (pid ${server.pid()})`);
  let socket: BoardSocket | null = null;
  try {
    const emails = [...new Set([...RECORD_READERS, COMMANDER])];
    const tokens = new Map(await Promise.all(emails.map(async (email) => [email, await signIn(server.url, email)] as const)));
    const commanderToken = tokens.get(COMMANDER)!;
    const jobs = (await getJson<{ items: { id: string; name: string; state: string }[] }>(`${server.url}/api/jobs`, tokens.get(RECORD_READERS[0])!)).items;
    const boardJob = jobs.find((j) => j.name === BOARD_JOB);
    const recordJob = jobs.find((j) => j.name === RECORD_JOB);
    if (!boardJob || !recordJob) throw new Error(`documents: the demo has no "${BOARD_JOB}" or "${RECORD_JOB}"`);
    // A finished job's record is cached on disk after its first rendering: this scenario needs every request rendered.
    if (recordJob.state !== 'live') throw new Error(`documents: "${RECORD_JOB}" is ${recordJob.state}, not live: its record would be read from the cache`);

    const board: BoardSocket = io(server.url, { transports: ['websocket'], auth: { token: commanderToken }, reconnection: false, forceNew: true });
    socket = board;
    const received = new Map<number, number>();
    board.on('board:event', (e) => {
      if (e.jobId === boardJob.id) received.set(e.seq, (received.get(e.seq) ?? 0) + 1);
    });
    const joined = await board.emitWithAck('board:join', { jobId: boardJob.id });
    if (!joined.ok) throw new Error(`documents: joining the board was refused: ${joined.error.code}`);
    const joinSeq = joined.seq;

    const all: Sample[] = [];
    // Warm-up, not counted: the first commands, and a first PDF so the worker thread is started
    // and its code loaded (about a second, once per server life) before any round.
    const warmCommands = paced(board, boardJob.id, (() => {
      const until = performance.now() + 1000;
      return () => performance.now() < until;
    })());
    const warmPdf = await renderRecord(server.url, commanderToken, recordJob.id);
    all.push(...(await warmCommands));
    if (!warmPdf.ok) notes.push(`The warm-up record PDF failed (status ${warmPdf.status}).`);
    log(`documents: signed in and warmed up (first PDF ${(warmPdf.ms / 1000).toFixed(2)} s) ${((performance.now() - bootStarted) / 1000).toFixed(1)} s after the start`);

    const measured: Round[] = [];
    for (let r = 0; r < rounds; r++) {
      await sleep(200);
      const restUntil = performance.now() + restMs;
      const restCpuStart = cpuOf(server.pid());
      const rest = await paced(board, boardJob.id, () => performance.now() < restUntil);
      const restCpuEnd = cpuOf(server.pid());
      await sleep(200);
      const renderCpuStart = cpuOf(server.pid());
      let rendering = true;
      const renders = Promise.all(RECORD_READERS.map((email) => renderRecord(server.url, tokens.get(email)!, recordJob.id))).finally(() => {
        rendering = false;
      });
      const during = await paced(board, boardJob.id, () => rendering);
      const pdfs = await renders;
      const renderCpuEnd = cpuOf(server.pid());
      const pdfAllMs = Math.max(...pdfs.map((p) => p.ms));
      all.push(...rest, ...during);
      const pdfCpuOf = (k: 'total' | 'main') => {
        const perCommandAtRest = (restCpuEnd[k] - restCpuStart[k]) / rest.length;
        return (renderCpuEnd[k] - renderCpuStart[k] - perCommandAtRest * during.length) / pdfs.length;
      };
      const round: Round = { rest: answered(rest), render: answered(during), pdfAllMs, pdfs, pdfCpu: { total: pdfCpuOf('total'), main: pdfCpuOf('main') } };
      measured.push(round);
      const failed = pdfs.filter((p) => !p.ok);
      if (failed.length) notes.push(`Round ${r + 1}: ${failed.length} of 3 record PDFs failed (status ${failed.map((p) => p.status).join(', ')}).`);
      log(
        `documents: round ${r + 1}/${rounds}: at rest p50 ${percentile(round.rest, 50).toFixed(1)} ms p99 ${percentile(round.rest, 99).toFixed(1)} ms (n=${round.rest.length}); ` +
          `rendering p50 ${round.render.length ? percentile(round.render, 50).toFixed(1) : '-'} ms p99 ${round.render.length ? percentile(round.render, 99).toFixed(1) : '-'} ms (n=${round.render.length}); ` +
          `server CPU per PDF ${round.pdfCpu.total.toFixed(0)} ms, ${round.pdfCpu.main.toFixed(0)} ms of it on the event loop's thread; three PDFs ${(pdfAllMs / 1000).toFixed(2)} s (each ${pdfs.map((p) => (p.ms / 1000).toFixed(2)).join(' / ')} s, ${pdfs.map((p) => Math.round(p.bytes / 1024)).join(' / ')} KiB)`,
      );
    }

    // Correctness: every command answered ok, each answer's event in the log at its seq, each seq
    // received once on the board, and no event in the log that no answer accounts for.
    correctness.rejected = all.filter((s) => !s.ok && s.code !== 'no_answer').length;
    correctness.lostAcks = all.filter((s) => s.code === 'no_answer').length;
    const rejections = [...new Set(all.flatMap((s) => (!s.ok && s.code && s.code !== 'no_answer' ? [s.code] : [])))];
    if (rejections.length) notes.push(`Refusals: ${rejections.join(', ')}.`);
    const acked = all.flatMap((s) => (s.ok && s.event ? [s.event] : []));
    const lastAcked = Math.max(joinSeq, ...acked.map((e) => e.seq));
    const allReceived = () => {
      for (let seq = joinSeq + 1; seq <= lastAcked; seq++) if (!received.has(seq)) return false;
      return true;
    };
    // Broadcast follows the commit, so the last events may still be on their way.
    for (const until = performance.now() + 3000; !allReceived() && performance.now() < until; ) await sleep(50);
    const logged = await eventsAfter(server.url, commanderToken, boardJob.id, joinSeq);
    const bySeq = new Map(logged.map((e) => [e.seq, e]));
    for (const event of acked) {
      const stored = bySeq.get(event.seq);
      if (!stored || stored.type !== event.type || stored.at !== event.at) correctness.lostAcks += 1;
    }
    const ackedSeqs = new Set(acked.map((e) => e.seq));
    correctness.duplicates += acked.length - ackedSeqs.size;
    // Events nobody was answered for: a command applied twice, or a lost answer.
    const unaccounted = logged.filter((e) => !ackedSeqs.has(e.seq)).length;
    if (unaccounted) notes.push(`${unaccounted} events in the board's log that no answer accounts for.`);
    correctness.duplicates += unaccounted;
    const lastSeq = Math.max(lastAcked, ...logged.map((e) => e.seq));
    for (let seq = joinSeq + 1; seq <= lastSeq; seq++) {
      const times = received.get(seq) ?? 0;
      if (times === 0) correctness.gaps += 1;
      if (times > 1) correctness.duplicates += times - 1;
    }

    const figure = (id: string, label: string, pick: (xs: number[]) => number): Figure => {
      const rest = measured.map((m) => pick(m.rest));
      // Every render phase has at least its first command, sent as the PDFs are asked for.
      const render = measured.map((m) => pick(m.render));
      const values = { holdline: spreadOf(render), 'holdline-at-rest': spreadOf(rest) };
      const ratio = ratioOf(values.holdline, values['holdline-at-rest']) ?? Number.NaN;
      return {
        id,
        label,
        unit: 'ms',
        better: 'lower',
        values,
        ratio: { against: 'holdline-at-rest', value: ratio },
        ...(id.endsWith('.max') ? {} : { target: { text: `≤ ${TARGET_RATIO}× at rest`, met: Number.isFinite(ratio) ? ratio <= TARGET_RATIO : null } }),
      };
    };
    const renderCounts = measured.map((m) => m.render.length);
    const restCounts = measured.map((m) => m.rest.length);
    const result: ScenarioResult = {
      id: 'documents',
      title: 'Board command while three record PDFs render',
      figures: [
        figure('documents.command.p50', `board command send → ack, p50 (${RATE_HZ}/s; three record PDFs rendering, against at rest)`, (xs) => percentile(xs, 50)),
        figure('documents.command.p99', `board command send → ack, p99 (${RATE_HZ}/s; three record PDFs rendering, against at rest)`, (xs) => percentile(xs, 99)),
        figure('documents.command.max', `board command send → ack, max (${RATE_HZ}/s; three record PDFs rendering, against at rest)`, (xs) => Math.max(...xs)),
        {
          id: 'documents.pdfs.ms',
          label: 'three record PDFs asked for at once, until the last arrives',
          unit: 'ms',
          better: 'lower',
          values: { holdline: spreadOf(measured.map((m) => m.pdfAllMs)) },
        },
        {
          id: 'documents.pdf.cpu',
          label: 'server CPU per record PDF, all threads (render phase less its commands at the rest rate)',
          unit: 'ms',
          better: 'lower',
          values: { holdline: spreadOf(measured.map((m) => m.pdfCpu.total)) },
        },
        {
          id: 'documents.pdf.cpu.main',
          label: 'of which on the event loop’s thread, where it delays commands',
          unit: 'ms',
          better: 'lower',
          values: { holdline: spreadOf(measured.map((m) => m.pdfCpu.main)) },
        },
      ],
      correctness,
      notes: [
        `Commands: weather readings on the live "${BOARD_JOB}" board over one socket from the bench's process, ${RATE_HZ}/s on a clock; answers per round at rest ${restCounts.join(', ')}, while rendering ${renderCounts.join(', ')} (p99 of so few is their max or next to it). HOLDLINE_COMMAND_RATE=${BENCH_COMMAND_RATE}.`,
        `PDFs: the record of the live "${RECORD_JOB}" (never cached while live), asked for by a planner, a crew member and a read-only viewer at once; each PDF's time per round: ${measured.map((m) => m.pdfs.map((p) => (p.ms / 1000).toFixed(2)).join('/')).join('; ')} s. Rendered in ${Math.max(1, Math.min(4, os.availableParallelism() - 1))} worker thread(s) here, by the pool's rule of one per core but one (server/pdf/pool.ts); the first PDF of the server's life (worker start) is a warm-up, not counted.`,
        ...notes,
      ],
    };
    return result;
  } finally {
    socket?.close();
    await server.stop();
  }
};
