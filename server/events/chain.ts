import type { EntityManager } from 'typeorm';
import { ChainWalker, type ChainCheck, type ChainedEvent } from '../../shared/events/chain.js';
import { JobEvent } from '../entities/JobEvent.js';
import { Job } from '../entities/Job.js';

/** Rows read from the database at a time, when walking or exporting a log. */
export const EVENT_PAGE_SIZE = 500;

/** A stored row as the chain and the exported log see it. */
export function chainedEventOf(row: JobEvent): ChainedEvent {
  return {
    jobId: row.jobId,
    seq: row.seq,
    commandId: row.commandId,
    type: row.type,
    byUserId: row.byUserId,
    byName: row.byName,
    role: row.role,
    at: row.at,
    data: row.data,
    prevHash: row.prevHash,
    hash: row.hash,
  };
}

/**
 * A job's stored events in storage order (seq, then row id, so a repeated or swapped seq still
 * shows), read a page at a time so no log is ever held whole. `untilSeq` stops at a head read
 * beforehand, so an export is one consistent prefix even while commands keep appending.
 */
export async function* storedEvents(manager: EntityManager, jobId: string, untilSeq = Number.MAX_SAFE_INTEGER, pageSize = EVENT_PAGE_SIZE): AsyncGenerator<JobEvent> {
  let after = { seq: -1, id: -1 };
  for (;;) {
    const page = await manager
      .createQueryBuilder(JobEvent, 'e')
      .where('e.job_id = :jobId AND e.seq <= :untilSeq AND (e.seq > :seq OR (e.seq = :seq AND e.id > :id))', { jobId, untilSeq, ...after })
      .orderBy('e.seq', 'ASC')
      .addOrderBy('e.id', 'ASC')
      .limit(pageSize)
      .getMany();
    for (const row of page) yield row;
    if (page.length < pageSize) return;
    const last = page[page.length - 1];
    after = { seq: last.seq, id: last.id };
  }
}

/**
 * Walks a job's events with the shared chain check and then compares the job row's head (last seq
 * and head hash) with the last event, which is where a deleted tail shows. `expectHash`, a head
 * hash kept outside the database, is looked for among the verified events.
 */
export async function verifyJobChain(manager: EntityManager, jobId: string, expectHash: string | null = null): Promise<ChainCheck> {
  const job = await manager.findOneByOrFail(Job, { id: jobId });
  const walker = new ChainWalker(expectHash);
  for await (const row of storedEvents(manager, jobId)) if (!walker.push(chainedEventOf(row))) break;
  return walker.result({ lastSeq: job.lastSeq, headHash: job.headHash });
}
