import type { DataSource } from 'typeorm';
import { applyEvent } from '../../shared/board/apply.js';
import type { BoardState } from '../../shared/board/types.js';
import type { JobEventDto } from '../../shared/events/log.js';
import { Job } from '../entities/Job.js';
import { JobEvent } from '../entities/JobEvent.js';
import { presentJobEvent } from '../presenters/job-event.js';
import { hydrate, statement, storedValue } from './statements.js';

/** How many jobs' rows are kept; a hire company's server holds dozens of live boards. */
const KEPT_JOBS = 500;

/**
 * A board snapshot is written once this many events have passed since the last one. A cold read
 * applies at most this many events to the snapshot (a millisecond or so each on a large board);
 * a command writes the board's tens of kilobytes only once in so many.
 */
export const BOARD_SNAPSHOT_EVERY = 50;

/** Events kept per job for rejoining screens: as many as a rejoin is answered with (sockets/board.ts JOIN_REPLAY_LIMIT). */
export const RECENT_EVENTS = 500;

interface Kept {
  job: Job;
  /** The seq of the board snapshot stored in `job_board` (0: none). */
  snapshotSeq: number;
  /** The job's latest events as committed, unredacted, in seq order and ending at `job.lastSeq` (or none). */
  recent: JobEventDto[];
}

/**
 * Every job row as last committed, with its board, kept in memory so that a board command does not
 * read and parse the row, rebuild the board or have TypeORM diff the row before writing. Each read
 * first asks the table for the row's head (`last_seq`, `head_hash`): every change to a job appends
 * an event and moves its head in the same transaction, so a kept row whose head matches is the
 * committed row, and one that does not (a write by another path, a rolled-back transaction) is
 * read again.
 *
 * The board is not on the job row: a cold read takes the last snapshot from `job_board` and
 * applies the events after it with the shared reducer, as every screen does.
 *
 * Read and written under the write queue only, where no other transaction is open on the shared
 * connection, so what is read is committed.
 */
export class CommittedJobs {
  private readonly rows = new Map<string, Kept>();

  constructor(private readonly dataSource: DataSource) {}

  /** The committed row and its board, as a copy the caller may change (top-level fields; nested values are shared and must be replaced, not changed). */
  read(jobId: string): Job | null {
    const head = statement(this.dataSource, 'SELECT last_seq, head_hash FROM job WHERE id = ?').get(jobId) as { last_seq: number; head_hash: string } | undefined;
    if (!head) {
      this.rows.delete(jobId);
      return null;
    }
    let kept = this.rows.get(jobId);
    if (!kept || kept.job.lastSeq !== head.last_seq || kept.job.headHash !== head.head_hash) {
      kept = this.load(jobId);
      this.keep(kept);
    }
    return copyOf(kept.job);
  }

  /** Whether a job of this id exists, without reading its row (asked on every join and follow). */
  exists(jobId: string): boolean {
    return statement(this.dataSource, 'SELECT 1 FROM job WHERE id = ?').get(jobId) !== undefined;
  }

  /**
   * Inside the caller's transaction: writes the columns of `job` that differ from the committed
   * row it was read from (all of them for a job not read through here), and its board when a
   * snapshot is due.
   */
  write(job: Job): void {
    const before = this.rows.get(job.id);
    const columns = this.dataSource
      .getMetadata(Job)
      .columns.filter((c) => c.propertyName !== 'id' && (!before || c.getEntityValue(job) !== c.getEntityValue(before.job)));
    if (columns.length) {
      const sql = `UPDATE job SET ${columns.map((c) => `"${c.databaseName}" = ?`).join(', ')} WHERE id = ?`;
      const values = columns.map((c) => storedValue(this.dataSource, Job, job, c.propertyName as keyof Job & string));
      const { changes } = statement(this.dataSource, sql).run(...values, job.id);
      if (changes !== 1) throw new Error(`The job row ${job.id} was not updated.`);
    }
    if (snapshotDue(job, before)) {
      statement(this.dataSource, 'INSERT INTO job_board (job_id, seq, board) VALUES (?, ?, ?) ON CONFLICT (job_id) DO UPDATE SET seq = excluded.seq, board = excluded.board').run(
        job.id,
        job.lastSeq,
        JSON.stringify(job.board),
      );
    }
  }

  /** After the commit: `job` (written through `write`) is now the committed row, and `event` its last event. */
  committed(job: Job, event: JobEventDto): void {
    const before = this.rows.get(job.id);
    // Kept only while they run on without a hole up to the row's head.
    const recent = before && before.job.lastSeq === event.seq - 1 ? before.recent : [];
    recent.push(event);
    if (recent.length > RECENT_EVENTS) recent.splice(0, recent.length - RECENT_EVENTS);
    this.keep({ job: copyOf(job), snapshotSeq: snapshotDue(job, before) ? job.lastSeq : (before?.snapshotSeq ?? 0), recent });
  }

  /**
   * The events after `afterSeq` up to the head of the row last read, unredacted, when they are all
   * kept; null when the database must be asked. Call right after `read` of the same job.
   */
  recentAfter(jobId: string, afterSeq: number): JobEventDto[] | null {
    const recent = this.rows.get(jobId)?.recent;
    if (!recent?.length || afterSeq + 1 < recent[0].seq) return null;
    return recent.slice(afterSeq + 1 - recent[0].seq);
  }

  /** Events read from the database after a `read`, running up to the row's head: kept for the next rejoin. */
  remember(jobId: string, events: JobEventDto[]): void {
    const kept = this.rows.get(jobId);
    if (!kept || events.at(-1)?.seq !== kept.job.lastSeq || (kept.recent.length && kept.recent[0].seq <= events[0].seq)) return;
    kept.recent = events.slice(-RECENT_EVENTS);
  }

  private load(jobId: string): Kept {
    const row = statement(this.dataSource, 'SELECT * FROM job WHERE id = ?').get(jobId) as Record<string, unknown>;
    const job = hydrate(this.dataSource, Job, row);
    const snapshot = statement(this.dataSource, 'SELECT seq, board FROM job_board WHERE job_id = ?').get(jobId) as { seq: number; board: string } | undefined;
    let board = snapshot ? (JSON.parse(snapshot.board) as BoardState) : null;
    const after = statement(this.dataSource, 'SELECT * FROM job_event WHERE job_id = ? AND seq > ? ORDER BY seq').all(jobId, snapshot?.seq ?? 0) as Record<string, unknown>[];
    for (const event of after) board = applyEvent(board, presentJobEvent(hydrate(this.dataSource, JobEvent, event)));
    job.board = board;
    return { job, snapshotSeq: snapshot?.seq ?? 0, recent: [] };
  }

  private keep(kept: Kept): void {
    this.rows.delete(kept.job.id);
    this.rows.set(kept.job.id, kept);
    // Oldest first in a Map's order: the least recently read or written row goes.
    if (this.rows.size > KEPT_JOBS) this.rows.delete(this.rows.keys().next().value!);
  }
}

/** Whether `write` stores the board with this change (and `committed` then knows it is stored). */
function snapshotDue(job: Job, before: Kept | undefined): boolean {
  return job.board !== null && job.board !== undefined && (!before || job.lastSeq - before.snapshotSeq >= BOARD_SNAPSHOT_EVERY);
}

const byDataSource = new WeakMap<DataSource, CommittedJobs>();

/** The committed job rows of one database (one per data source, shared by every reader and writer of it). */
export function committedJobs(dataSource: DataSource): CommittedJobs {
  let jobs = byDataSource.get(dataSource);
  if (!jobs) byDataSource.set(dataSource, (jobs = new CommittedJobs(dataSource)));
  return jobs;
}

function copyOf(job: Job): Job {
  return Object.assign(new Job(), job);
}
