import { LessThanOrEqual, type EntityManager } from 'typeorm';
import { replay } from '../../shared/board/apply.js';
import { shiftOf } from '../../shared/board/shifts.js';
import type { BoardState } from '../../shared/board/types.js';
import type { JobEventDto } from '../../shared/events/log.js';
import { roleLabel } from '../../shared/schemas/users.js';
import { Job } from '../entities/Job.js';
import { JobEvent } from '../entities/JobEvent.js';
import { presentJobEvent } from '../presenters/job-event.js';
import type { QueuedMail } from './outbox.js';
import { shiftAnchorMail as shiftAnchorText, siteWords, type ShiftAnchorFacts } from './templates.js';

/**
 * The shift-end e-mails ("anchored at each shift end"): when an event makes a job `made_safe`, and
 * again when a handover note is written while it is, one e-mail to each address of the job's
 * distribution list with the log's head hash after that event, so each shift leaves a hash
 * outside the database. The facts are read from the log replayed up to that event (the same
 * reducer as the board), never from the job row, which may have moved on by the time this runs.
 */

/** Whether the writer recorded this event as making its job safe (the last make-safe item). */
export function makesSafe(event: Pick<JobEventDto, 'data'>): boolean {
  return event.data.effects?.job?.state === 'made_safe';
}

/** Whether this event may need a shift-end e-mail: it made the job safe, or wrote a handover note (sent only when the job was made safe then). */
export function mayAnchorShift(event: Pick<JobEventDto, 'type' | 'data'>): boolean {
  return makesSafe(event) || event.type === 'handover.written';
}

/** The shift-end e-mails for the event `seq` of a job; none when it neither made the job safe nor wrote a note while it was. */
export async function shiftAnchorMails(manager: EntityManager, publicUrl: string, jobId: string, seq: number): Promise<QueuedMail[]> {
  const job = await manager.findOneBy(Job, { id: jobId });
  if (!job || job.distribution.length === 0) return [];
  const rows = await manager.find(JobEvent, { where: { jobId, seq: LessThanOrEqual(seq) }, order: { seq: 'ASC' } });
  const row = rows.at(-1);
  if (!row || row.seq !== seq) return [];
  // Every stored event parses (tests/server/events/stored-log.test.ts); the board at that event is their replay.
  const events = rows.map(presentJobEvent);
  const event = events.at(-1)!;
  const board = replay(events);
  if (!board) return [];
  const occasion = makesSafe(event) ? 'made_safe' : event.type === 'handover.written' && board.job.state === 'made_safe' ? 'handover' : null;
  if (!occasion) return [];
  const facts = shiftFacts(board, job, occasion, { seq: row.seq, hash: row.hash, at: row.at, byName: row.byName }, publicUrl);
  const zone = facts.timeZone;
  const { subject, text } = shiftAnchorText(facts, (iso) => `on ${siteWords(iso, zone)}`);
  return job.distribution.map((to) => ({
    dedupeKey: `shift-anchor:${job.id}:${seq}:${to.toLowerCase()}`,
    kind: 'shift_anchor' as const,
    jobId: job.id,
    to,
    subject,
    body: text,
  }));
}

function shiftFacts(board: BoardState, job: Job, occasion: ShiftAnchorFacts['occasion'], event: ShiftAnchorFacts['event'], publicUrl: string): ShiftAnchorFacts {
  const shift = shiftOf(board);
  const makeSafe = shift.makeSafe;
  // The note written for the shift that ended; a note of an earlier shift is not this shift's handover.
  const note = (board.handovers ?? []).filter((h) => h.shift === shift.number).at(-1) ?? null;
  return {
    job: { id: job.id, name: board.job.name, kind: board.job.kind, site: board.job.site, craneFleetNumber: board.job.craneFleetNumber || null },
    timeZone: board.job.timeZone ?? job.timeZone ?? 'UTC',
    occasion,
    shift: shift.number,
    event,
    ended: makeSafe ? { name: makeSafe.begunBy.name, at: makeSafe.begunBy.at } : null,
    madeSafe: makeSafe?.madeSafe ? { name: makeSafe.madeSafe.name, at: makeSafe.madeSafe.at } : null,
    items: (makeSafe?.items ?? []).map((i) => ({
      text: i.text,
      doneBy: i.doneBy ? { name: i.doneBy.name, role: roleLabel(i.doneBy.role).toLowerCase(), at: i.doneBy.at, note: i.doneBy.note } : null,
    })),
    handover: note
      ? {
          from: note.from.name,
          to: note.to?.name ?? null,
          at: note.at,
          done: note.done,
          open: note.open,
          defects: note.defects,
          overrides: note.overrides,
          hazards: note.hazards,
          note: note.note,
          acknowledgedBy: note.acknowledgedBy ? { name: note.acknowledgedBy.name, at: note.acknowledgedBy.at } : null,
        }
      : null,
    publicUrl,
  };
}
