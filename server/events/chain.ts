import { createHash } from 'node:crypto';
import canonicalize from 'canonicalize';
import type { EntityManager } from 'typeorm';
import { JobEvent } from '../entities/JobEvent.js';
import { Job } from '../entities/Job.js';

/** The hash before a job's first event. */
export const GENESIS_HASH = '0'.repeat(64);

/** The fields of an event that its hash covers. */
export interface HashedEventFields {
  jobId: string;
  seq: number;
  commandId: string;
  type: string;
  byUserId: string;
  byName: string;
  role: string;
  at: string;
  data: Record<string, unknown>;
}

/** SHA-256 of the previous hash and the RFC 8785 canonical JSON of the event. */
export function eventHash(prevHash: string, event: HashedEventFields): string {
  const canonical = canonicalize({
    jobId: event.jobId,
    seq: event.seq,
    commandId: event.commandId,
    type: event.type,
    by: event.byUserId,
    byName: event.byName,
    role: event.role,
    at: event.at,
    data: event.data,
  });
  if (canonical === undefined) throw new Error('event cannot be canonicalised');
  return createHash('sha256').update(prevHash).update(canonical).digest('hex');
}

/** SHA-256 of a command's canonical JSON, to tell a repeated command from a reused id. */
export function commandHash(command: unknown): string {
  return createHash('sha256').update(canonicalize(command) ?? 'null').digest('hex');
}

export interface ChainCheck {
  valid: boolean;
  checked: number;
  firstBadSeq: number | null;
}

/**
 * Walks a job's events in order and checks the sequence has no gaps, each event's prevHash is the
 * hash before it, each hash matches its content, and the job row's head matches the last event.
 */
export async function verifyJobChain(manager: EntityManager, jobId: string): Promise<ChainCheck> {
  const job = await manager.findOneByOrFail(Job, { id: jobId });
  const events = await manager.find(JobEvent, { where: { jobId }, order: { seq: 'ASC', id: 'ASC' } });
  let prev = GENESIS_HASH;
  let checked = 0;
  for (let i = 0; i < events.length; i++) {
    const event = events[i];
    const expectedSeq = i + 1;
    if (event.seq !== expectedSeq) return { valid: false, checked, firstBadSeq: expectedSeq };
    if (event.prevHash !== prev || eventHash(prev, event) !== event.hash) return { valid: false, checked, firstBadSeq: event.seq };
    prev = event.hash;
    checked += 1;
  }
  // A deleted tail, or a job row pointing past its events, shows here.
  if (job.lastSeq !== events.length) return { valid: false, checked, firstBadSeq: events.length + 1 };
  if (job.headHash !== prev) return { valid: false, checked, firstBadSeq: Math.max(1, events.length) };
  return { valid: true, checked, firstBadSeq: null };
}
