/**
 * The two baselines of the benchmark, run in a process of their own:
 *
 *   node --import tsx bench/servers/relay.ts --mode relay|sqlite-relay [--db file] [--port n]
 *
 * A minimal Socket.IO server (Holdline's socket.io version and transports) speaking the part of
 * Holdline's board protocol the benchmark uses: any token is accepted; `board:join` joins the
 * job's room and answers the events after `afterSeq` or a small snapshot; `board:command` gives
 * the command the job's next seq, keeps its id exactly once per job and broadcasts `board:event`
 * to the room. The 'sqlite-relay' commits each command as one row, in its own transaction, with
 * Holdline's pragmas, before the broadcast and the answer; restarted on the same file it goes on
 * from the seq stored there. The 'relay' keeps everything in memory. `GET /api/jobs/:id/events`
 * pages the log as Holdline's route does, so the benchmark can check every answered command is in it.
 * Once listening it prints `relay listening <port>` on stdout.
 */
import http from 'node:http';
import { parseArgs } from 'node:util';
import Database from 'better-sqlite3';
import { Server } from 'socket.io';
import { SOCKET_MESSAGE_LIMIT_BYTES } from '../../server/middlewares/input-guard.js';

/** Holdline's limits, so a rejoin is answered the same way: events up to this many missed, then a snapshot. */
const JOIN_REPLAY_LIMIT = 500;
const EVENTS_PAGE_LIMIT = 1000;

interface RelayEvent {
  jobId: string;
  seq: number;
  commandId: string;
  type: string;
  data: Record<string, unknown>;
  at: string;
}

/** Where the log lives: memory for the bare relay, one SQLite row per event for the other. */
interface Log {
  lastSeq(jobId: string): number;
  byCommandId(jobId: string, commandId: string): RelayEvent | undefined;
  /** Stores the event; it is durable when this returns. */
  append(event: RelayEvent): void;
  after(jobId: string, afterSeq: number, limit: number): RelayEvent[];
}

function memoryLog(): Log {
  const jobs = new Map<string, { events: RelayEvent[]; byCommand: Map<string, RelayEvent> }>();
  const of = (jobId: string) => {
    let job = jobs.get(jobId);
    if (!job) jobs.set(jobId, (job = { events: [], byCommand: new Map() }));
    return job;
  };
  return {
    lastSeq: (jobId) => of(jobId).events.length,
    byCommandId: (jobId, commandId) => of(jobId).byCommand.get(commandId),
    append(event) {
      const job = of(event.jobId);
      job.events.push(event);
      job.byCommand.set(event.commandId, event);
    },
    // seq n is events[n - 1]
    after: (jobId, afterSeq, limit) => of(jobId).events.slice(afterSeq, afterSeq + limit),
  };
}

function sqliteLog(file: string): Log {
  const db = new Database(file);
  // The pragmas of server/db/data-source.ts: the baseline pays the same fsync per commit.
  db.pragma('journal_mode = WAL');
  db.pragma('synchronous = FULL');
  db.pragma('foreign_keys = ON');
  db.pragma('busy_timeout = 5000');
  if (db.pragma('synchronous', { simple: true }) !== 2) throw new Error('PRAGMA synchronous did not take FULL');
  db.exec(`CREATE TABLE IF NOT EXISTS event (
    job_id TEXT NOT NULL,
    seq INTEGER NOT NULL,
    command_id TEXT NOT NULL,
    body TEXT NOT NULL,
    at TEXT NOT NULL,
    PRIMARY KEY (job_id, seq),
    UNIQUE (job_id, command_id)
  )`);
  const maxSeq = db.prepare<[string], { seq: number | null }>('SELECT MAX(seq) AS seq FROM event WHERE job_id = ?');
  const byCommand = db.prepare<[string, string], { body: string }>('SELECT body FROM event WHERE job_id = ? AND command_id = ?');
  const insert = db.prepare<[string, number, string, string, string]>('INSERT INTO event (job_id, seq, command_id, body, at) VALUES (?, ?, ?, ?, ?)');
  const after = db.prepare<[string, number, number], { body: string }>('SELECT body FROM event WHERE job_id = ? AND seq > ? ORDER BY seq LIMIT ?');
  // One row, one transaction, one fsync: what Holdline's command path does per command.
  const appendOne = db.transaction((event: RelayEvent) => {
    insert.run(event.jobId, event.seq, event.commandId, JSON.stringify(event), event.at);
  });
  const seqs = new Map<string, number>();
  return {
    lastSeq(jobId) {
      let seq = seqs.get(jobId);
      if (seq === undefined) seqs.set(jobId, (seq = maxSeq.get(jobId)?.seq ?? 0));
      return seq;
    },
    byCommandId(jobId, commandId) {
      const row = byCommand.get(jobId, commandId);
      return row ? (JSON.parse(row.body) as RelayEvent) : undefined;
    },
    append(event) {
      appendOne(event);
      seqs.set(event.jobId, event.seq);
    },
    after: (jobId, afterSeq, limit) => after.all(jobId, afterSeq, limit).map((row) => JSON.parse(row.body) as RelayEvent),
  };
}

interface CommandPayload {
  jobId: string;
  command: { commandId: string; type: string } & Record<string, unknown>;
}

function isCommandPayload(payload: unknown): payload is CommandPayload {
  if (typeof payload !== 'object' || payload === null) return false;
  const { jobId, command } = payload as { jobId?: unknown; command?: unknown };
  if (typeof jobId !== 'string' || typeof command !== 'object' || command === null) return false;
  const { commandId, type } = command as { commandId?: unknown; type?: unknown };
  return typeof commandId === 'string' && commandId.length > 0 && typeof type === 'string';
}

const refusal = (code: string, message: string) => ({ ok: false as const, error: { code, message } });

function main(): void {
  const { values } = parseArgs({ options: { mode: { type: 'string', default: 'relay' }, db: { type: 'string' }, port: { type: 'string', default: '0' } } });
  const mode = values.mode;
  if (mode !== 'relay' && mode !== 'sqlite-relay') throw new Error(`unknown mode ${mode}`);
  if (mode === 'sqlite-relay' && !values.db) throw new Error('the sqlite-relay needs --db <file>');
  const log = mode === 'sqlite-relay' ? sqliteLog(values.db as string) : memoryLog();

  const httpServer = http.createServer((req, res) => {
    const url = new URL(req.url ?? '/', 'http://relay');
    const match = /^\/api\/jobs\/([^/]+)\/events$/.exec(url.pathname);
    if (req.method === 'GET' && match) {
      const jobId = decodeURIComponent(match[1]);
      const after = Number(url.searchParams.get('after') ?? 0);
      res.setHeader('content-type', 'application/json');
      res.end(JSON.stringify({ items: log.after(jobId, Number.isFinite(after) ? after : 0, EVENTS_PAGE_LIMIT), lastSeq: log.lastSeq(jobId) }));
      return;
    }
    if (url.pathname === '/api/health') {
      res.end('ok');
      return;
    }
    res.statusCode = 404;
    res.end();
  });
  // Holdline's options apart from its origin check: default transports, no client file, same message limit.
  const io = new Server(httpServer, { serveClient: false, maxHttpBufferSize: SOCKET_MESSAGE_LIMIT_BYTES });
  io.use((socket, next) => {
    const token: unknown = socket.handshake.auth?.token;
    next(typeof token === 'string' && token.length > 0 ? undefined : new Error('unauthenticated'));
  });

  io.on('connection', (socket) => {
    socket.on('board:join', (payload: unknown, ack: unknown) => {
      if (typeof ack !== 'function') return;
      const { jobId, afterSeq } = (payload ?? {}) as { jobId?: unknown; afterSeq?: unknown };
      if (typeof jobId !== 'string') return ack(refusal('bad_request', 'Say which job to join.'));
      // Joined before reading, as Holdline does, so nothing committed in between is missed.
      void socket.join(`job:${jobId}`);
      const seq = log.lastSeq(jobId);
      if (typeof afterSeq === 'number' && afterSeq >= 0 && afterSeq <= seq && seq - afterSeq <= JOIN_REPLAY_LIMIT) {
        return ack({ ok: true, mode: 'events', events: log.after(jobId, afterSeq, JOIN_REPLAY_LIMIT), seq });
      }
      // A board's worth of state stands in for Holdline's projection: the last few events.
      const recent = log.after(jobId, Math.max(0, seq - 10), 10);
      return ack({ ok: true, mode: 'snapshot', snapshot: { jobId, seq, recent }, seq });
    });

    socket.on('board:leave', (payload: unknown) => {
      const jobId = (payload as { jobId?: unknown } | null)?.jobId;
      if (typeof jobId === 'string') void socket.leave(`job:${jobId}`);
    });

    socket.on('board:command', (payload: unknown, ack: unknown) => {
      if (typeof ack !== 'function') return;
      if (!isCommandPayload(payload)) return ack(refusal('bad_request', 'The command is not valid.'));
      const { jobId, command } = payload;
      const earlier = log.byCommandId(jobId, command.commandId);
      // Exactly once: a command id sent again is answered with its first event, not written twice.
      if (earlier) return ack({ ok: true, seq: earlier.seq, event: earlier });
      const { commandId, type, ...data } = command;
      const event: RelayEvent = { jobId, seq: log.lastSeq(jobId) + 1, commandId, type, data, at: new Date().toISOString() };
      try {
        log.append(event);
      } catch (error) {
        return ack(refusal('internal', error instanceof Error ? error.message : String(error)));
      }
      // Committed first, then told: the same order as Holdline.
      io.to(`job:${jobId}`).emit('board:event', event);
      return ack({ ok: true, seq: event.seq, event });
    });
  });

  httpServer.listen(Number(values.port), '127.0.0.1', () => {
    const address = httpServer.address();
    const port = typeof address === 'object' && address ? address.port : 0;
    process.stdout.write(`relay listening ${port}\n`);
  });
  const stop = () => {
    void io.close();
    process.exit(0);
  };
  process.once('SIGTERM', stop);
  process.once('SIGINT', stop);
}

main();
