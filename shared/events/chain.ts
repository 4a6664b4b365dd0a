import { sha256 } from '@noble/hashes/sha2.js';
import { bytesToHex, utf8ToBytes } from '@noble/hashes/utils.js';
import canonicalize from 'canonicalize';
import { z } from 'zod';

/**
 * The job log's hash chain, the one code the server and the command-line checker
 * (scripts/verify-record.ts) both run, so a log downloaded as JSON Lines is checked exactly as the
 * server checks its database. Pure: no database, no Node modules.
 *
 * Each event's hash is SHA-256 (FIPS 180-4) over the previous hash (64 hex characters) followed by
 * the RFC 8785 canonical JSON of the event's fields, both as UTF-8. Whoever can write the database
 * can recompute every hash after an edit, so a plain check proves only that the log is consistent;
 * a head hash kept outside (on a printed record, in an e-mail) is what proves it was not rewritten:
 * `expectHash` asks whether the log still leads to it.
 */

/** The hash before a job's first event. */
export const GENESIS_HASH = '0'.repeat(64);

/** A SHA-256 written as lowercase hex, as every hash in the log is. */
export const hashSchema = z.string().regex(/^[0-9a-f]{64}$/, 'a SHA-256 hash: 64 characters 0-9 and a-f');

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

function sha256Hex(...parts: string[]): string {
  const hasher = sha256.create();
  for (const part of parts) hasher.update(utf8ToBytes(part));
  return bytesToHex(hasher.digest());
}

/** SHA-256 of the previous hash and the RFC 8785 canonical JSON of the event. */
export function eventHash(prevHash: string, event: HashedEventFields): string {
  // The key names (`by`, not `byUserId`) are part of every stored hash: never rename them.
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
  return sha256Hex(prevHash, canonical);
}

/** SHA-256 of a command's canonical JSON, to tell a repeated command from a reused id. */
export function commandHash(command: unknown): string {
  return sha256Hex(canonicalize(command) ?? 'null');
}

/**
 * One line of a job's exported log (events.jsonl): the stored event with its chain. `redacted`
 * marks a line whose data had blind-check values taken out for a reader who may not see them;
 * its hash can then not be recomputed, and the checker says so instead of calling the log valid.
 */
export const chainedEventSchema = z.object({
  jobId: z.string(),
  seq: z.number().int(),
  commandId: z.string(),
  type: z.string(),
  byUserId: z.string(),
  byName: z.string(),
  role: z.string(),
  at: z.string(),
  data: z.record(z.string(), z.unknown()),
  prevHash: z.string(),
  hash: z.string(),
  redacted: z.literal(true).optional(),
});
export type ChainedEvent = z.infer<typeof chainedEventSchema>;

/** Why a chain stopped verifying at `firstBadSeq`. */
export type ChainProblem =
  /** An event is missing, repeated or out of order. */
  | 'sequence'
  /** An event does not point at the hash of the one before it. */
  | 'link'
  /** An event's content no longer gives its hash: it was changed. */
  | 'content'
  /** The line was redacted for its reader, so its hash cannot be recomputed. */
  | 'redacted'
  /** The job's recorded head (last seq and head hash) does not match the last event. */
  | 'head';

export interface ExpectedHashCheck {
  hash: string;
  /** Whether an event of the verified part of the chain has this hash. */
  found: boolean;
  seq: number | null;
}

export interface ChainCheck {
  valid: boolean;
  /** Events whose hash was recomputed and matched, from the first on. */
  checked: number;
  firstBadSeq: number | null;
  problem: ChainProblem | null;
  /** The last event's hash when the whole chain verifies (the genesis hash for an empty log); null otherwise. */
  finalHash: string | null;
  expected?: ExpectedHashCheck;
}

/**
 * Checks a chain one event at a time, so a caller can feed it pages from a database or lines from
 * a file without holding the whole log. Events must be pushed in the order they are stored.
 */
export class ChainWalker {
  private prev = GENESIS_HASH;
  private checked = 0;
  private bad: { seq: number; problem: ChainProblem } | null = null;
  private foundAt: number | null = null;

  constructor(private readonly expectHash: string | null = null) {}

  /** Checks the next event; returns false once the chain is broken (later events are not checked). */
  push(event: ChainedEvent): boolean {
    if (this.bad) return false;
    const expectedSeq = this.checked + 1;
    if (event.seq !== expectedSeq) return this.fail(expectedSeq, 'sequence');
    if (event.prevHash !== this.prev) return this.fail(event.seq, 'link');
    if (event.redacted) return this.fail(event.seq, 'redacted');
    if (eventHash(this.prev, event) !== event.hash) return this.fail(event.seq, 'content');
    this.prev = event.hash;
    this.checked += 1;
    if (this.expectHash !== null && this.foundAt === null && event.hash === this.expectHash) this.foundAt = event.seq;
    return true;
  }

  /**
   * The result. `head` is what the job row says its log ends with, when there is one: a log cut
   * short (its last events deleted) is caught only there.
   */
  result(head?: { lastSeq: number; headHash: string }): ChainCheck {
    let bad = this.bad;
    if (!bad && head) {
      if (head.lastSeq !== this.checked) bad = { seq: this.checked + 1, problem: 'head' };
      else if (head.headHash !== this.prev) bad = { seq: Math.max(1, this.checked), problem: 'head' };
    }
    const check: ChainCheck = {
      valid: bad === null,
      checked: this.checked,
      firstBadSeq: bad?.seq ?? null,
      problem: bad?.problem ?? null,
      finalHash: bad ? null : this.prev,
    };
    if (this.expectHash !== null) {
      // Matched against events' own hashes only: the genesis hash, where every log starts, is never "found".
      check.expected = { hash: this.expectHash, found: this.foundAt !== null, seq: this.foundAt };
    }
    return check;
  }

  private fail(seq: number, problem: ChainProblem): false {
    this.bad = { seq, problem };
    return false;
  }
}

/** Checks a whole chain held in memory (tests, small logs). */
export function verifyChain(events: Iterable<ChainedEvent>, expectHash: string | null = null): ChainCheck {
  const walker = new ChainWalker(expectHash);
  for (const event of events) if (!walker.push(event)) break;
  return walker.result();
}
