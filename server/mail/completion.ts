import type { EntityManager } from 'typeorm';
import { committedJobs } from '../db/committed-jobs.js';
import { describeEvent, namesFromLog } from '../../shared/events/sentences.js';
import type { JobEventDto } from '../../shared/events/log.js';
import { roleLabel } from '../../shared/schemas/users.js';
import { JobEvent } from '../entities/JobEvent.js';
import { presentJobEvent } from '../presenters/job-event.js';
import type { QueuedMail } from './outbox.js';
import { siteWords, zoneLine } from './templates.js';

/**
 * The completion e-mails of a job: one to each address of its distribution list, with the
 * final hash of the log in the body (the hash kept outside the database, so a record rewritten
 * later no longer leads to it) and the record PDF attached when it is sent. The final sign-off
 * (the last hold released before completion, with its acknowledgments) is read from the log, so
 * it reads the same for any ending.
 */
export async function completionMail(manager: EntityManager, publicUrl: string, jobId: string, seq: number): Promise<QueuedMail[]> {
  const job = committedJobs(manager.connection).read(jobId);
  if (!job || job.distribution.length === 0) return [];
  const rows = await manager.find(JobEvent, { where: { jobId }, order: { seq: 'ASC' } });
  const completed = rows.find((r) => r.seq === seq);
  if (!completed) return [];
  const events = rows.flatMap((row): JobEventDto[] => {
    try {
      return [presentJobEvent(row)];
    } catch {
      // An event this version cannot read still counts in the hash; it is only left out of the words.
      return [];
    }
  });
  const names = namesFromLog(events);
  // The completing event may itself be the release of the final sign-off.
  const release = events.filter((e) => e.seq <= seq && e.type === 'hold.released').at(-1);
  const hold = release?.type === 'hold.released' ? job.board?.stages.find((s) => s.hold?.id === release.data.holdId)?.hold : null;

  const signOff = release
    ? [
        'Final sign-off:',
        `  ${describeEvent(release, { names })}`,
        `  Released by ${release.by.name} (${roleLabel(release.by.role).toLowerCase()}), ${siteWords(release.at, job.timeZone)}`,
        ...(hold?.acknowledgments ?? []).map((a) => `  Acknowledged by ${a.name} (${a.inspector ? 'qualified inspector' : roleLabel(a.role).toLowerCase()}), ${siteWords(a.at, job.timeZone)}`),
      ]
    : ['No hold point was released before the job was completed.'];
  const fleet = job.board?.job.craneFleetNumber;
  const body = [
    `The ${job.kind} job “${job.name}” at ${job.site}${fleet ? ` (crane ${fleet})` : ''} was completed by ${completed.byName} on ${siteWords(completed.at, job.timeZone)}.`,
    '',
    ...signOff,
    '',
    `Final hash of the job's record: ${completed.hash}`,
    `(the record's last event, number ${completed.seq})`,
    '',
    'Keep this e-mail. The hash stands for the whole record: if the stored record is ever changed,',
    'it no longer leads to this hash, and checking it against the record shows the change.',
    '',
    `The job in Holdline: ${publicUrl}/jobs/${job.id}`,
    '',
    zoneLine(job.timeZone),
  ].join('\n');

  return job.distribution.map((to) => ({
    dedupeKey: `completion:${job.id}:${seq}:${to.toLowerCase()}`,
    kind: 'completion' as const,
    jobId: job.id,
    to,
    subject: `Record of ${job.name}: job complete`,
    body,
    attachments: [{ kind: 'record-pdf' as const, jobId: job.id }],
  }));
}

/**
 * Whether an event completed its job: a `job.completed`, or any event the writer recorded as
 * setting the job's state to complete (a final hold whose release completes the job).
 */
export function completesJob(event: Pick<JobEventDto, 'type' | 'data'>): boolean {
  return event.type === 'job.completed' || event.data.effects?.job?.state === 'complete';
}

/** The seq of the event that completed a job, read from the end of its log; null when none did. */
export async function completingSeq(manager: EntityManager, jobId: string): Promise<number | null> {
  const rows = await manager.find(JobEvent, { where: { jobId }, order: { seq: 'DESC' }, take: 50, select: { seq: true, type: true, data: true } });
  const found = rows.find((r) => r.type === 'job.completed' || stateSetTo(r.data) === 'complete');
  return found?.seq ?? null;
}

/** The job state a stored event's effects set, read without parsing the whole event; null when it set none. */
export function stateSetTo(data: Record<string, unknown>): unknown {
  const effects = data.effects;
  if (typeof effects !== 'object' || effects === null || !('job' in effects)) return null;
  const job = effects.job;
  return typeof job === 'object' && job !== null && 'state' in job ? job.state : null;
}
