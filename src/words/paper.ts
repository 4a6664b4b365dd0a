import type { JobState } from '../../shared/schemas/jobs';

/**
 * Words of the paper copy: the plan from where the board stands now, printed with boxes to write
 * in, for when the site's network dies and the crew work on paper and radio
 * (GET /api/jobs/:id/paper.pdf, server/pdf/paper-copy.ts).
 */
export const PAPER_COPY_WORDS = {
  label: 'Paper copy from here on',
  /** On the board's narrow tool bar, where a long label would wrap. */
  short: 'Paper copy',
  hint: 'Every stage still to do, with boxes for initials, times and readings. Print it while the network is up.',
  downloading: 'Making the paper copy…',
  failed: (reason: string) => `The paper copy could not be downloaded. ${reason} Try again while the network is up; failing that, the plan PDF on the job’s plan tab has every stage.`,
  dismiss: 'Dismiss',
  /** The end of the saved file's name. */
  fileSuffix: 'paper-copy.pdf',
} as const;

/** A paper copy is printed from a board with a plan in force: not while planning, not once the job is closed. */
export function paperCopyOffered(state: JobState): boolean {
  return state === 'ready' || state === 'live' || state === 'stopped' || state === 'made_safe';
}
