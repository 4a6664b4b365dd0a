import type { DataSource } from 'typeorm';
import { Job } from '../entities/Job.js';
import { hydrate, statement, storedValue } from './statements.js';

/** How many jobs' rows are kept; a hire company's server holds dozens of live boards. */
const KEPT_JOBS = 500;

/**
 * Every job row as last committed, kept in memory so that a board command does not read and
 * parse the whole row (the board projection alone is tens of kilobytes of JSON) and TypeORM does
 * not diff it before writing. Each read first asks the table for the row's head (`last_seq`,
 * `head_hash`): every change to a job appends an event and moves its head in the same
 * transaction, so a kept row whose head matches is the committed row, and one that does not (a
 * write by another path, a rolled-back transaction) is read again.
 *
 * Read and written under the write queue only, where no other transaction is open on the shared
 * connection, so what is read is committed.
 */
export class CommittedJobs {
  private readonly rows = new Map<string, Job>();

  constructor(private readonly dataSource: DataSource) {}

  /** The committed row, as a copy the caller may change (top-level fields; nested values are shared and must be replaced, not changed). */
  read(jobId: string): Job | null {
    const head = statement(this.dataSource, 'SELECT last_seq, head_hash FROM job WHERE id = ?').get(jobId) as { last_seq: number; head_hash: string } | undefined;
    if (!head) {
      this.rows.delete(jobId);
      return null;
    }
    let kept = this.rows.get(jobId);
    if (!kept || kept.lastSeq !== head.last_seq || kept.headHash !== head.head_hash) {
      const row = statement(this.dataSource, 'SELECT * FROM job WHERE id = ?').get(jobId) as Record<string, unknown>;
      kept = hydrate(this.dataSource, Job, row);
      this.keep(kept);
    }
    return copyOf(kept);
  }

  /**
   * Writes the columns of `job` that differ from the committed row it was read from (all of
   * them for a job not read through here), inside the caller's transaction.
   */
  write(job: Job): void {
    const before = this.rows.get(job.id);
    const columns = this.dataSource.getMetadata(Job).columns.filter((c) => c.propertyName !== 'id' && (!before || c.getEntityValue(job) !== c.getEntityValue(before)));
    if (!columns.length) return;
    const sql = `UPDATE job SET ${columns.map((c) => `"${c.databaseName}" = ?`).join(', ')} WHERE id = ?`;
    const values = columns.map((c) => storedValue(this.dataSource, Job, job, c.propertyName as keyof Job & string));
    const { changes } = statement(this.dataSource, sql).run(...values, job.id);
    if (changes !== 1) throw new Error(`The job row ${job.id} was not updated.`);
  }

  /** After the commit: `job` is now the committed row. */
  committed(job: Job): void {
    this.keep(copyOf(job));
  }

  /** Forgets a row (after a failed transaction that may have changed it). */
  forget(jobId: string): void {
    this.rows.delete(jobId);
  }

  private keep(job: Job): void {
    this.rows.delete(job.id);
    this.rows.set(job.id, job);
    // Oldest first in a Map's order: the least recently read or written row goes.
    if (this.rows.size > KEPT_JOBS) this.rows.delete(this.rows.keys().next().value!);
  }
}

function copyOf(job: Job): Job {
  return Object.assign(new Job(), job);
}
