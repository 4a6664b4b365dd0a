import type { JoinAnswer } from '../events/socket.js';
import type { JobEventDto } from '../events/log.js';
import { applyEvent } from './apply.js';
import type { BoardSnapshot, BoardState, PresenceEntry } from './types.js';

/** A board that has not heard a tick for this long is not live. */
export const STALE_AFTER_MS = 3000;

/** How a follower reaches the server; the client passes its socket and API, tests pass fakes. */
export interface FollowerTransport {
  join(jobId: string, afterSeq?: number): Promise<JoinAnswer>;
  /** Events after `afterSeq` over HTTP, for filling a gap. */
  fetchEvents(jobId: string, afterSeq: number): Promise<JobEventDto[]>;
}

export interface FollowerOptions {
  now?: () => number;
  /** Called after every change of board, liveness or presence. */
  onChange?: () => void;
  /** Called when an event was applied (for sounds, flashes, announcements). */
  onEvent?: (event: JobEventDto, board: BoardSnapshot) => void;
}

/**
 * Keeps one client's copy of a job's board exact: applies events strictly in seq order with the
 * shared reducer, fetches what it missed when it sees a gap or a tick ahead of it, rejoins with
 * `afterSeq` after a reconnect, and says it is not live as soon as ticks stop.
 */
export class BoardFollower {
  board: BoardSnapshot | null = null;
  /** When the board last matched the server (a tick at our seq, or an applied event). */
  lastSyncAt = 0;
  private lastTickAt = 0;
  private syncing: Promise<void> | null = null;
  private readonly pending = new Map<number, JobEventDto>();
  private readonly now: () => number;

  constructor(
    readonly jobId: string,
    private readonly transport: FollowerTransport,
    private readonly options: FollowerOptions = {},
  ) {
    this.now = options.now ?? (() => Date.now());
  }

  get seq(): number {
    return this.board?.seq ?? 0;
  }

  /** Live means: ticks arriving and nothing known to be missing. */
  get live(): boolean {
    return this.board !== null && this.syncing === null && this.pending.size === 0 && this.now() - this.lastTickAt <= STALE_AFTER_MS;
  }

  /** Joins (or rejoins after a reconnect) with the last seq held, so only what was missed comes back. */
  async join(): Promise<void> {
    const answer = await this.transport.join(this.jobId, this.board ? this.board.seq : undefined);
    if (!answer.ok) throw new Error(answer.error.message);
    this.lastTickAt = this.now();
    if (answer.mode === 'snapshot') {
      this.board = { ...(JSON.parse(answer.board) as BoardState), presence: answer.presence };
      this.pending.clear();
    } else {
      for (const event of answer.events) this.accept(event);
    }
    this.drain();
    this.lastSyncAt = this.now();
    this.changed();
  }

  /** A `board:event` from the server. */
  onEvent(event: JobEventDto): void {
    if (event.jobId !== this.jobId || !this.board || event.seq <= this.board.seq) return;
    this.accept(event);
    this.drain();
    if (this.pending.size > 0) void this.fillGap();
    this.changed();
  }

  /** A `board:tick`: proof of life, and a check that nothing was missed. */
  onTick(tick: { jobId: string; seq: number }): void {
    if (tick.jobId !== this.jobId) return;
    this.lastTickAt = this.now();
    if (tick.seq > this.seq) void this.fillGap();
    else if (tick.seq === this.seq) this.lastSyncAt = this.now();
    this.changed();
  }

  /** A `board:presence` delta. */
  onPresence(delta: { jobId: string; joined: PresenceEntry[]; left: string[] }): void {
    if (delta.jobId !== this.jobId || !this.board) return;
    const left = new Set(delta.left);
    const joined = new Map(delta.joined.map((p) => [p.userId, p]));
    this.board.presence = [...this.board.presence.filter((p) => !left.has(p.userId) && !joined.has(p.userId)), ...joined.values()];
    this.changed();
  }

  /** The connection dropped: not live at once, without waiting for the ticks to be missed. */
  onDisconnect(): void {
    this.lastTickAt = 0;
    this.changed();
  }

  /** Call on a timer (e.g. every 500 ms) so liveness changes show without any message arriving. */
  checkLiveness(): void {
    this.changed();
  }

  private accept(event: JobEventDto): void {
    if (!this.board || event.seq <= this.board.seq) return;
    this.pending.set(event.seq, event);
  }

  /** Applies buffered events while they follow on exactly. */
  private drain(): void {
    while (this.board && this.pending.has(this.board.seq + 1)) {
      const event = this.pending.get(this.board.seq + 1)!;
      this.pending.delete(event.seq);
      const presence = this.board.presence;
      this.board = { ...applyEvent(this.board, event), presence };
      this.lastSyncAt = this.now();
      this.options.onEvent?.(event, this.board);
    }
    for (const seq of this.pending.keys()) if (this.board && seq <= this.board.seq) this.pending.delete(seq);
  }

  /** Fetches the missing events over HTTP; concurrent callers share one request. */
  private fillGap(): Promise<void> {
    this.syncing ??= (async () => {
      try {
        const missed = await this.transport.fetchEvents(this.jobId, this.seq);
        for (const event of missed) this.accept(event);
        this.drain();
      } finally {
        this.syncing = null;
        this.changed();
      }
    })();
    return this.syncing;
  }

  private changed(): void {
    this.options.onChange?.();
  }
}
