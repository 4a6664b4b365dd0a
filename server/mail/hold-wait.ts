import type { EntityManager } from 'typeorm';
import { committedJobs } from '../db/committed-jobs.js';
import type { BoardHold, BoardState } from '../../shared/board/types.js';
import type { CrewRole } from '../../shared/schemas/jobs.js';
import { JobEvent } from '../entities/JobEvent.js';
import type { OutboxHoldWait } from '../entities/MailOutbox.js';

/** When a hold's current wait began: the event that opened it, and its time. */
export interface HoldWaitStart {
  seq: number;
  at: string;
}

const PAGE = 200;

/**
 * Finds the event that began the hold's current wait, reading the log from its end: the last
 * event whose effects set the hold to `open` (the stage's steps were all done, or an
 * acknowledgment was withdrawn), or a plan revision, which gives the hold back its acknowledgments
 * and makes the crew acknowledge it again under the new version. Each such event starts a new
 * wait, so a reminder belongs to one wait and is never repeated for it. Null when the hold is not
 * open.
 */
export async function holdWaitStart(manager: EntityManager, jobId: string, holdId: string): Promise<HoldWaitStart | null> {
  for (let skip = 0; ; skip += PAGE) {
    const rows = await manager.find(JobEvent, { where: { jobId }, order: { seq: 'DESC' }, skip, take: PAGE, select: { seq: true, type: true, at: true, data: true } });
    for (const row of rows) {
      if (row.type === 'plan.revised' || openedHold(row.data, holdId)) return { seq: row.seq, at: row.at };
    }
    if (rows.length < PAGE) return null;
  }
}

function openedHold(data: Record<string, unknown>, holdId: string): boolean {
  const effects = data.effects;
  if (typeof effects !== 'object' || effects === null || !('holds' in effects) || !Array.isArray(effects.holds)) return false;
  return effects.holds.some((h: unknown) => typeof h === 'object' && h !== null && 'id' in h && 'state' in h && h.id === holdId && h.state === 'open');
}

/**
 * The crew roles a hold still waits for (required and not yet acknowledged in that role). The
 * final sign-off's inspector is a person the admin marks, not a crew role, so it is not among them.
 */
export function rolesStillNeeded(hold: BoardHold): CrewRole[] {
  return hold.requiredRoles.filter((role) => !hold.acknowledgments.some((a) => !a.inspector && a.role === role));
}

/** The open hold with this id on a board, or null. */
export function openHold(board: BoardState | null, holdId: string): BoardHold | null {
  for (const stage of board?.stages ?? []) {
    if (stage.hold?.id === holdId) return stage.state === 'holding' && stage.hold.state === 'open' ? stage.hold : null;
  }
  return null;
}

/**
 * Whether a queued reminder is still wanted when its turn comes: the hold is still open in the
 * same wait (not released, skipped, acknowledged by everyone, or opened again under a new plan
 * version) and still waits for one of the roles the reminder named.
 */
export async function holdStillWaiting(manager: EntityManager, wait: OutboxHoldWait): Promise<boolean> {
  const job = committedJobs(manager.connection).read(wait.jobId);
  if (!job || (job.state !== 'live' && job.state !== 'stopped')) return false;
  const hold = openHold(job.board, wait.holdId);
  if (!hold) return false;
  const needed = rolesStillNeeded(hold);
  if (!wait.roles.some((role) => needed.includes(role))) return false;
  const start = await holdWaitStart(manager, wait.jobId, wait.holdId);
  return start?.seq === wait.openedSeq;
}
