import { siteDate, siteDateTime, utcTime } from '../../shared/time.js';
import type { OutgoingMail } from './mailer.js';

/** The invitation e-mail: a single-use link that lets the person set a password. */
export function invitationMail(to: string, displayName: string, link: string, invitedBy: string): OutgoingMail {
  return {
    to,
    subject: 'You are invited to Holdline',
    text: [
      `Hello ${displayName},`,
      '',
      `${invitedBy} has added you to Holdline, the live board your crane assembly crew uses.`,
      'Open this link to choose your password and sign in. It works once, for 72 hours:',
      '',
      link,
      '',
      'If you did not expect this, you can ignore this e-mail.',
    ].join('\n'),
  };
}

/** The password reset e-mail: a single-use link valid for one hour. */
export function resetMail(to: string, displayName: string, link: string): OutgoingMail {
  return {
    to,
    subject: 'Reset your Holdline password',
    text: [
      `Hello ${displayName},`,
      '',
      'Someone asked to reset the password of your Holdline account.',
      'Open this link to choose a new password. It works once, for 1 hour:',
      '',
      link,
      '',
      'If it was not you, ignore this e-mail: your password stays as it is.',
    ].join('\n'),
  };
}

/**
 * A time in an e-mail: the site's date and clock with its UTC offset, then UTC (with its own date
 * when that differs), so a reader anywhere reads the same moment: "3 Dec 2026, 18:04 (UTC+01:00), 17:04 UTC".
 */
export function siteWords(at: string, zone: string): string {
  const utcDate = siteDate(at, 'UTC');
  const utc = utcDate === siteDate(at, zone) ? utcTime(at) : `${utcDate}, ${utcTime(at)}`;
  return `${siteDateTime(at, zone)}, ${utc}`;
}

/** The line that says once which zone an e-mail's times are in. */
export function zoneLine(zone: string): string {
  return `Times are the site's (${zone}), each with its offset from UTC.`;
}

/** The one reminder a crew member gets when a hold has waited for them while they are not on the board. */
export function holdReminderMail(
  to: string,
  person: { displayName: string; roles: string[] },
  hold: { title: string; waitedMinutes: number; openSince: string },
  job: { name: string; site: string; craneFleetNumber: string; timeZone: string },
  link: string,
): OutgoingMail {
  return {
    to,
    subject: `Hold point waiting for you: ${hold.title} (${job.name})`,
    text: [
      `Hello ${person.displayName},`,
      '',
      `The hold point “${hold.title}” on ${job.name} at ${job.site} (crane ${job.craneFleetNumber}) has waited ${hold.waitedMinutes} minutes for the ${person.roles.join(' and ')}, and you are not on the board.`,
      `It has waited since ${siteWords(hold.openSince, job.timeZone)}.`,
      '',
      'Open the hold:',
      link,
      '',
      'Acknowledge it only for what you have checked yourself on site. If you cannot come, tell the supervisor so the crew can be changed.',
      'This is the only reminder for this wait of the hold.',
      '',
      zoneLine(job.timeZone),
    ].join('\n'),
  };
}

/** What a shift-end e-mail says: the hash kept outside the database at the moment the job was made safe, or a handover note was written while it is. */
export interface ShiftAnchorFacts {
  job: { id: string; name: string; kind: string; site: string; craneFleetNumber: string | null };
  /** The job's site zone: every time is written in it, with its UTC offset. */
  timeZone: string;
  /** What this e-mail was sent for: the job made safe, or a handover note written while it is made safe. */
  occasion: 'made_safe' | 'handover';
  /** The shift that ended. */
  shift: number;
  /** The event that made the job safe (or wrote the note): the log's head after it. */
  event: { seq: number; hash: string; at: string; byName: string };
  /** Who ended the shift and who ticked the last make-safe item, when. */
  ended: { name: string; at: string } | null;
  madeSafe: { name: string; at: string } | null;
  /** The make-safe checklist as done: item, who, when, their note. */
  items: { text: string; doneBy: { name: string; role: string; at: string; note: string | null } | null }[];
  /** The latest handover note written for this shift, in full; null when none was written yet. */
  handover: {
    from: string;
    to: string | null;
    at: string;
    done: string[];
    open: string[];
    defects: string[];
    overrides: string[];
    hazards: string;
    note: string;
    acknowledgedBy: { name: string; at: string } | null;
  } | null;
  publicUrl: string;
}

/**
 * The shift-end e-mail to the job's distribution list: the log's head hash after the job was made
 * safe (or after a handover note written while it is), the seq, who made it safe and when (site
 * time with its offset), the handover note in full, and how to check the hash later. Each shift
 * so leaves a hash outside the database.
 */
export function shiftAnchorMail(f: ShiftAnchorFacts, at: (iso: string) => string): { subject: string; text: string } {
  const crane = f.job.craneFleetNumber ? ` (crane ${f.job.craneFleetNumber})` : '';
  const list = (title: string, items: readonly string[], none: string) => (items.length ? [`${title}:`, ...items.map((i) => `  - ${i}`)] : [`${title}: ${none}`]);
  const indented = (text: string) => text.split(/\r?\n/).map((line) => `  ${line}`);
  const handover = f.handover
    ? [
        `Handover note for shift ${f.shift}, written by ${f.handover.from} ${at(f.handover.at)}${f.handover.to ? ` for ${f.handover.to}` : ''}:`,
        '',
        ...list('Done', f.handover.done, 'nothing listed'),
        ...list('Open', f.handover.open, 'nothing listed'),
        ...list('Open defects', f.handover.defects, 'none'),
        ...list('Overrides in force', f.handover.overrides, 'none'),
        'Hazards:',
        ...indented(f.handover.hazards),
        'Note:',
        ...indented(f.handover.note),
        f.handover.acknowledgedBy ? `Read and acknowledged by ${f.handover.acknowledgedBy.name} ${at(f.handover.acknowledgedBy.at)}.` : 'Not yet acknowledged by the supervisor taking over.',
      ]
    : ['No handover note was written before the job was made safe.'];
  const items = f.items.map((i) =>
    i.doneBy ? `  - ${i.text} Done by ${i.doneBy.name} (${i.doneBy.role}) ${at(i.doneBy.at)}.${i.doneBy.note ? ` Noted: ${i.doneBy.note}` : ''}` : `  - ${i.text} Not done.`,
  );
  const opening =
    f.occasion === 'made_safe'
      ? `The ${f.job.kind} job “${f.job.name}” at ${f.job.site}${crane} was made safe at the end of shift ${f.shift}${f.madeSafe ? ` ${at(f.madeSafe.at)}, the last item by ${f.madeSafe.name}` : ''}.`
      : `A handover note was written for the ${f.job.kind} job “${f.job.name}” at ${f.job.site}${crane} ${at(f.event.at)} by ${f.event.byName}, while the job is made safe after shift ${f.shift}${f.madeSafe ? ` (made safe ${at(f.madeSafe.at)}, the last item by ${f.madeSafe.name})` : ''}.`;
  const text = [
    opening,
    ...(f.ended ? [`${f.ended.name} ended the shift ${at(f.ended.at)}.`] : []),
    'No work goes on until the start-of-shift hold of the next shift is released.',
    '',
    `Hash of the job's record after this event: ${f.event.hash}`,
    `(event number ${f.event.seq} of the record)`,
    '',
    ...handover,
    '',
    ...(items.length ? ['The make-safe checklist:', ...items, ''] : []),
    'Keep this e-mail. The hash stands for the whole record up to this event: if anything up to it',
    'is ever changed, the record no longer leads to this hash. To check it:',
    `  - in Holdline, open the job's record page (${f.publicUrl}/jobs/${f.job.id}/record), paste the hash`,
    '    into “Hash from a printed record or an e-mail” and press “Check this hash”;',
    '  - or, with the job’s exported events.jsonl and no server at all:',
    `    npm run verify-record -- events.jsonl --expect ${f.event.hash}`,
    '',
    zoneLine(f.timeZone),
  ].join('\n');
  const subject = f.occasion === 'made_safe' ? `Record of ${f.job.name}: made safe at the end of shift ${f.shift}` : `Record of ${f.job.name}: handover note for shift ${f.shift}`;
  return { subject, text };
}
