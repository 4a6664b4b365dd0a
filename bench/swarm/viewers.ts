/**
 * A swarm process of board viewers: `node --import tsx bench/swarm/viewers.ts`, forked by
 * bench/lib/swarm.ts and driven over IPC (bench/swarm/protocol.ts). Each viewer is a real
 * Socket.IO client as the board uses one (websocket transport, the same reconnection delays as
 * src/services/socket.ts): it joins the board, rejoins with the last seq it holds after every
 * reconnection, keeps the events in seq order as the board store does (shared/board/follower.ts:
 * a seq at or below the one it holds is dropped), and notes when it first held each seq.
 */
import { io, type Socket } from 'socket.io-client';
import {
  now,
  type ArrivalsResult,
  type ConnectResult,
  type Counters,
  type RejoinResult,
  type Reply,
  type SyncResult,
  type Target,
  type ViewerRequest,
} from './protocol.js';

/** A board event as the swarm needs it: Holdline's and the relays' share these fields. */
interface WireEvent {
  jobId: string;
  seq: number;
  type?: string;
  at?: string;
}

type WireJoinAnswer =
  | { ok: true; mode: 'events'; events: WireEvent[]; seq: number }
  | { ok: true; mode: 'snapshot'; snapshot: unknown; seq: number }
  | { ok: false; error: { code: string; message: string } };

interface ListenEvents {
  'board:event': (event: WireEvent) => void;
}
interface EmitEvents {
  'board:join': (payload: { jobId: string; afterSeq?: number }, ack: (answer: WireJoinAnswer) => void) => void;
}

const JOIN_TIMEOUT_MS = 30_000;

interface Viewer {
  socket: Socket<ListenEvents, EmitEvents>;
  /** Every seq up to this one is held (-1 before the first join). */
  contig: number;
  /** Seqs held beyond `contig`, waiting for the one before them. */
  ahead: Set<number>;
  /** When its last join was answered ok (0: never). */
  joinedAt: number;
  firstJoin: ((result: { ok: true } | { ok: false; reason: string }) => void) | null;
  /** The bench disconnected it on purpose and will bring it back. */
  dropped: boolean;
  /** While returning after a drop: bytes of its join answer and of the live events until it holds `want.target`. */
  measuring: boolean;
  answerBytes: number;
  liveBytes: number;
  mode: string;
  want: { target: number; since: number } | null;
  syncedAt: number;
}

let target: Target | null = null;
let viewers: Viewer[] = [];
/** The first event seen at each seq in this process, to tell a re-delivery from another event at the same seq. */
const fingerprints = new Map<number, string>();
/** Per seq: the first and last moment a socket of this process came to hold it. */
const firstAt = new Map<number, number>();
const lastAt = new Map<number, number>();
let counters: Counters = freshCounters();

function freshCounters(): Counters {
  return { redeliveries: 0, duplicates: 0, unexpectedDisconnects: 0, refusedJoins: 0, refusalCodes: [] };
}

const fingerprint = (e: WireEvent) => `${e.type ?? ''}|${e.at ?? ''}`;

function checkSync(v: Viewer): void {
  if (v.want && Number.isNaN(v.syncedAt) && v.joinedAt > v.want.since && v.contig >= v.want.target) v.syncedAt = now();
}

/** The viewer now holds this event, unless it already did (the board store's de-duplication by seq). */
function hold(v: Viewer, e: WireEvent, at: number, live: boolean): void {
  if (!target || e.jobId !== target.jobId || typeof e.seq !== 'number') return;
  const seq = e.seq;
  const print = fingerprint(e);
  const known = fingerprints.get(seq);
  if (known === undefined) fingerprints.set(seq, print);
  else if (known !== print) counters.duplicates += 1;
  if (seq <= v.contig || v.ahead.has(seq)) {
    counters.redeliveries += 1;
    return;
  }
  if (live && v.measuring) v.liveBytes += Buffer.byteLength(JSON.stringify(e));
  const first = firstAt.get(seq);
  if (first === undefined || at < first) firstAt.set(seq, at);
  const last = lastAt.get(seq);
  if (last === undefined || at > last) lastAt.set(seq, at);
  v.ahead.add(seq);
  drain(v);
}

function drain(v: Viewer): void {
  if (v.contig < 0) return;
  while (v.ahead.delete(v.contig + 1)) v.contig += 1;
  for (const seq of v.ahead) if (seq <= v.contig) v.ahead.delete(seq);
  checkSync(v);
}

async function join(v: Viewer): Promise<void> {
  if (!target) return;
  const afterSeq = v.contig >= 0 ? v.contig : undefined;
  let answer: WireJoinAnswer;
  try {
    answer = await v.socket.timeout(JOIN_TIMEOUT_MS).emitWithAck('board:join', afterSeq === undefined ? { jobId: target.jobId } : { jobId: target.jobId, afterSeq });
  } catch (error) {
    v.firstJoin?.({ ok: false, reason: error instanceof Error ? error.message : String(error) });
    return;
  }
  const at = now();
  if (!answer.ok) {
    counters.refusedJoins += 1;
    if (counters.refusalCodes.length < 20) counters.refusalCodes.push(answer.error.code);
    v.firstJoin?.({ ok: false, reason: answer.error.code });
    return;
  }
  if (v.measuring) v.answerBytes += Buffer.byteLength(JSON.stringify(answer));
  v.mode = answer.mode;
  if (answer.mode === 'snapshot') {
    // The snapshot is the board at `seq`: everything up to it is held.
    v.contig = Math.max(v.contig, answer.seq);
  } else {
    if (v.contig < 0) v.contig = afterSeq ?? 0;
    for (const e of answer.events) hold(v, e, at, false);
  }
  v.joinedAt = at;
  drain(v);
  v.firstJoin?.({ ok: true });
  v.firstJoin = null;
}

function makeViewer(index: number): Viewer {
  const t = target!;
  const socket: Socket<ListenEvents, EmitEvents> = io(t.url, {
    transports: ['websocket'],
    auth: { token: t.tokens[index % t.tokens.length] },
    forceNew: true,
    // The board's own connection settings (src/services/socket.ts).
    reconnection: true,
    reconnectionDelay: 500,
    reconnectionDelayMax: 3_000,
    timeout: 5_000,
  });
  const v: Viewer = {
    socket,
    contig: -1,
    ahead: new Set(),
    joinedAt: 0,
    firstJoin: null,
    dropped: false,
    measuring: false,
    answerBytes: 0,
    liveBytes: 0,
    mode: '',
    want: null,
    syncedAt: Number.NaN,
  };
  socket.on('board:event', (e) => hold(v, e, now(), true));
  socket.on('connect', () => void join(v));
  socket.on('disconnect', (reason) => {
    if (reason !== 'io client disconnect') counters.unexpectedDisconnects += 1;
  });
  return v;
}

function closeAll(): void {
  for (const v of viewers) v.socket.disconnect();
  viewers = [];
}

const counted = () => viewers.filter((v) => !v.dropped);

/** Missing seqs in [from, to] over these viewers. */
function gapsOf(list: Viewer[], from: number, to: number): number {
  let gaps = 0;
  for (const v of list) for (let seq = Math.max(from, v.contig + 1); seq <= to; seq++) if (!v.ahead.has(seq)) gaps += 1;
  return gaps;
}

async function until(done: () => boolean, timeoutMs: number): Promise<void> {
  const end = now() + timeoutMs;
  while (!done() && now() < end) await new Promise((r) => setTimeout(r, 10));
}

async function handle(request: ViewerRequest): Promise<unknown> {
  switch (request.op) {
    case 'attach': {
      closeAll();
      target = request.target;
      fingerprints.clear();
      firstAt.clear();
      lastAt.clear();
      counters = freshCounters();
      return null;
    }
    case 'connect': {
      const fresh: Viewer[] = [];
      const results: Promise<{ ok: true; at: number } | { ok: false; reason: string }>[] = [];
      for (let i = 0; i < request.count; i++) {
        const v = makeViewer(request.firstIndex + i);
        fresh.push(v);
        results.push(
          new Promise((resolve) => {
            const timer = setTimeout(() => resolve({ ok: false, reason: 'not joined in time' }), request.timeoutMs);
            v.firstJoin = (r) => {
              clearTimeout(timer);
              v.firstJoin = null;
              resolve(r.ok ? { ok: true, at: v.joinedAt } : r);
            };
          }),
        );
      }
      viewers.push(...fresh);
      const settled = await Promise.all(results);
      const result: ConnectResult = { joinedAt: [], failed: 0, reasons: [] };
      for (const r of settled) {
        if (r.ok) result.joinedAt.push(r.at);
        else {
          result.failed += 1;
          if (!result.reasons.includes(r.reason)) result.reasons.push(r.reason);
        }
      }
      return result;
    }
    case 'shrink': {
      for (const v of viewers.splice(Math.max(0, viewers.length - request.count))) v.socket.disconnect();
      return null;
    }
    case 'arrivals': {
      const list = counted();
      const result: ArrivalsResult = { first: [], last: [], holders: [], sockets: list.length, gaps: gapsOf(list, request.from, request.to) };
      for (let seq = request.from; seq <= request.to; seq++) {
        result.first.push(firstAt.get(seq) ?? Number.NaN);
        result.last.push(lastAt.get(seq) ?? Number.NaN);
        let holders = 0;
        for (const v of list) if (seq <= v.contig || v.ahead.has(seq)) holders += 1;
        result.holders.push(holders);
      }
      return result;
    }
    case 'drop': {
      let left = request.count;
      for (const v of viewers) {
        if (left === 0) break;
        if (v.dropped) continue;
        v.dropped = true;
        v.socket.disconnect();
        left -= 1;
      }
      return null;
    }
    case 'rejoin': {
      const back = viewers.filter((v) => v.dropped);
      const since = now();
      for (const v of back) {
        Object.assign(v, { dropped: false, measuring: true, answerBytes: 0, liveBytes: 0, mode: '', want: { target: request.target, since }, syncedAt: Number.NaN });
        v.socket.connect();
      }
      await until(() => back.every((v) => !Number.isNaN(v.syncedAt)), request.timeoutMs);
      for (const v of back) Object.assign(v, { measuring: false, want: null });
      const result: RejoinResult = {
        syncedAt: back.map((v) => v.syncedAt),
        answerBytes: back.map((v) => v.answerBytes),
        liveBytes: back.map((v) => v.liveBytes),
        modes: back.map((v) => v.mode),
        gaps: gapsOf(back, 0, request.target),
      };
      return result;
    }
    case 'awaitSync': {
      const list = counted();
      for (const v of list) Object.assign(v, { want: { target: request.target, since: request.since }, syncedAt: Number.NaN });
      for (const v of list) checkSync(v);
      await until(() => list.every((v) => !Number.isNaN(v.syncedAt)), request.timeoutMs);
      for (const v of list) v.want = null;
      const result: SyncResult = {
        syncedAt: list.map((v) => v.syncedAt),
        notRejoined: list.filter((v) => v.joinedAt <= request.since).length,
        gaps: gapsOf(list, 0, request.target),
      };
      return result;
    }
    case 'counters':
      return counters;
    case 'close':
      closeAll();
      setTimeout(() => process.exit(0), 50);
      return null;
  }
}

process.on('message', (message: { id: number; request: ViewerRequest }) => {
  handle(message.request).then(
    (result) => process.send?.({ id: message.id, ok: true, result } satisfies Reply),
    (error: unknown) => process.send?.({ id: message.id, ok: false, error: error instanceof Error ? (error.stack ?? error.message) : String(error) } satisfies Reply),
  );
});
// The parent went away: nothing left to report to.
process.on('disconnect', () => process.exit(0));
