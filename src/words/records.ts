import type { RecordDateField, RecordVerification } from '../../shared/schemas/records';
import type { Tone } from './common';

/** The files a job's record leaves the server as; each is fetched with the session's token. */
export type RecordFileKind = 'record' | 'siteFile' | 'csv' | 'jsonl';

/** Each download's button words, its icon, what it holds, and the end of the saved file's name. */
export const recordFileWords: Record<RecordFileKind, { label: string; icon: string; hint: string; suffix: string }> = {
  record: { label: 'Record PDF', icon: 'picture_as_pdf', hint: 'The printed record with every page’s final hash.', suffix: 'record.pdf' },
  siteFile: { label: 'Site file', icon: 'folder_zip', hint: 'One zip: the record PDF, the log, the configuration and plan PDFs, the photos.', suffix: 'site-file.zip' },
  csv: { label: 'Events CSV', icon: 'table_view', hint: 'One row per event, for a spreadsheet.', suffix: 'events.csv' },
  jsonl: { label: 'Full log', icon: 'data_object', hint: 'Every stored event with its hash (JSON Lines), for npm run verify-record.', suffix: 'events.jsonl' },
};

/** A failed download in words: which file, the server's reason, and what to do. */
export function downloadFailed(kind: RecordFileKind, reason: string): string {
  return `${recordFileWords[kind].label} could not be downloaded. ${reason} Try again; if it keeps failing, tell your administrator.`;
}

/** A chain's state as words, an icon and a colour that only repeats them. */
export function verificationWords(v: Pick<RecordVerification, 'valid' | 'checked' | 'firstBadSeq'>): { label: string; icon: string; tone: Tone; detail: string } {
  if (v.valid) {
    return { label: 'Chain verified', icon: 'verified', tone: 'done', detail: `All ${v.checked} events lead to the final hash.` };
  }
  return {
    label: `Chain broken at event ${v.firstBadSeq ?? '?'}`,
    icon: 'gpp_bad',
    tone: 'stop',
    detail: `The stored log no longer leads to its hash from event ${v.firstBadSeq ?? '?'} on. Do not rely on this record; tell your administrator.`,
  };
}

export const recordsWords = {
  title: 'Records',
  intro: 'Every job you may read, with its log’s chain checked now. The final hash is also printed on every page of the record PDF: compare them.',
  filters: {
    state: 'State',
    anyState: 'Any state',
    unit: 'Crane unit',
    anyUnit: 'Any crane unit',
    site: 'Site contains',
    dateField: 'Dates by',
    from: 'From',
    to: 'To',
    clear: 'Clear filters',
    show: 'Filters',
    hide: 'Hide filters',
  },
  dateFields: { updated: 'Last change', ended: 'Completed or cancelled' } satisfies Record<RecordDateField, string>,
  columns: { job: 'Job', unit: 'Crane unit', state: 'State', dates: 'Dates', chain: 'Chain and final hash', hash: 'Final hash', files: 'Downloads' },
  rowsPerPage: 'Jobs per page',
  loading: 'Loading records and checking each chain…',
  notLoaded: 'Nothing to show until the records load.',
  empty: 'No records to show you yet. You see the jobs whose crew you are in (admins see every job); a job appears here as soon as you create it or are put in its crew.',
  noMatch: 'No job matches these filters. Clear a filter or widen the dates.',
  updated: 'Last change',
  ended: 'Ended',
  notEnded: 'Not ended',
  endedAs: { complete: 'Completed', cancelled: 'Cancelled' },
  inProgress: 'In progress: the record is still growing.',
  openRecord: 'Open record',
  hash: {
    show: 'Show the full hash',
    hide: 'Hide the full hash',
    copy: 'Copy hash',
    copied: 'Final hash copied.',
    copyFailed: 'The hash could not be copied: select it and copy it by hand.',
    unproven: 'Stored head hash (not proven: the chain is broken)',
  },
  timeline: {
    timeline: 'What happened, newest first',
    event: 'Event',
    as: 'as',
    inspector: 'Qualified inspector',
    photoOf: 'Photo recorded with event',
    breaksHere: 'The chain breaks here',
    notProven: 'Not proven',
  },
  dismiss: 'Dismiss',
  page: {
    title: 'Record',
    back: 'Records',
    toJob: 'Job page',
    loading: 'Loading the record…',
    noEvents: 'Nothing recorded yet.',
    events: 'events',
    verifying: 'Checking the chain…',
    recheck: 'Check again',
  },
} as const;
