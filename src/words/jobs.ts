import { jobStateLabels, type JobDto, type JobKind, type JobState } from '../../shared/schemas/jobs';
import type { Tone } from './common';

/** The sections of a job's page. */
export type JobTab = 'overview' | 'crew' | 'comms' | 'planner' | 'log';

/** A job's state in words, with its icon and colour. */
export const jobStateWords: Record<JobState, { label: string; icon: string; tone: Tone; hint: string }> = {
  planning: { label: jobStateLabels.planning, icon: 'edit_note', tone: 'info', hint: 'The configuration, crew and plan are being prepared.' },
  ready: { label: jobStateLabels.ready, icon: 'flag', tone: 'hold', hint: 'The plan is locked; the crew is briefed before work starts.' },
  live: { label: jobStateLabels.live, icon: 'play_circle', tone: 'done', hint: 'Work is under way on the board.' },
  stopped: { label: jobStateLabels.stopped, icon: 'pan_tool', tone: 'stop', hint: 'All stop recorded. Nothing moves until the supervisor resumes.' },
  made_safe: { label: jobStateLabels.made_safe, icon: 'nightlight', tone: 'hold', hint: 'The shift ended with the boom made safe. No work until the start-of-shift checks are done.' },
  complete: { label: jobStateLabels.complete, icon: 'task_alt', tone: 'plain', hint: 'Finished; the record is closed.' },
  cancelled: { label: jobStateLabels.cancelled, icon: 'block', tone: 'plain', hint: 'Called off before it was complete.' },
};

/**
 * The note above a job's tabs for a person who cannot change the plan: what is read only and,
 * past planning, whether the crew can still be changed (the server's `can`, never guessed here).
 * Null when the person edits the plan.
 */
export function readOnlyNote(job: Pick<JobDto, 'state' | 'can'>): { text: string; crewEditable: boolean } | null {
  if (job.can.edit) return null;
  if (job.state === 'planning') return { text: 'Read only: the job’s supervisors change the plan.', crewEditable: false };
  if (job.can.editCrew) return { text: 'The plan is locked; the crew can still be changed by the job’s supervisors.', crewEditable: true };
  return { text: `Read only: the job is ${jobStateWords[job.state].label.toLowerCase()}, past planning.`, crewEditable: false };
}

export const jobKindLabels: Record<JobKind, string> = { erection: 'Erection', dismantling: 'Dismantling' };

/** What a job's closed record is called: a dismantling job never talks of an erection record. */
export const jobRecordNames: Record<JobKind, string> = { erection: 'erection record', dismantling: 'dismantling record' };

/** The event log's verification, on the job's log tab. */
export const logCheckWords = {
  finalHash: 'Final hash',
  expectLabel: 'Hash from a printed record or an e-mail',
  expectHint: '64 characters, 0-9 and a-f. Checks whether this log still leads to it.',
  expectInvalid: 'A hash is 64 characters, 0-9 and a-f.',
  expectButton: 'Check this hash',
  /** The log leads to a hash kept outside: nothing before it was changed. */
  found: (seq: number | null) => `This log leads to that hash: it is the hash of event ${seq ?? '?'}. Nothing up to that event was changed since the hash was taken.`,
  notFound: 'This log does NOT lead to that hash. If the hash came from this job’s printed record or e-mail, the log was changed after it was taken: do not rely on this record and tell your administrator.',
};

/** The head of the log shown small on the board's history. */
export const headHashWords = {
  label: (seq: number) => `Log hash at event ${seq}`,
  hint: 'Compare it with the final hash on the printed record or in the e-mail.',
};

/** The site's time zone: chosen when a job is created, shown on its page (shared/time.ts writes the times). */
export const timeZoneWords = {
  label: 'Site time zone',
  hint: 'Every time for this job (board, e-mails, PDFs) is shown as the site’s clock with its offset from UTC.',
  noMatch: 'No time zone by that name. Type a city or region, e.g. Warsaw, Chicago or Kolkata.',
  /** A zone in the list, with its offset today. */
  option: (zone: string, offset: string) => `${zone.replace(/_/g, ' ')} · ${offset} now`,
  /** The job page's fact line. */
  fact: (zone: string, offset: string) => `${zone.replace(/_/g, ' ')}, ${offset} now`,
  editorHint: 'The zone of the site where the crane stands. Times already recorded keep their moment; they are shown again in the zone saved here.',
  save: 'Save the time zone',
  saved: (zone: string) => `Site time zone saved: ${zone.replace(/_/g, ' ')}.`,
};
