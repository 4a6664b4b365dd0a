import { defineStore } from 'pinia';
import { reactive, ref } from 'vue';
import type { JobState } from '../../shared/schemas/jobs';
import { recordListSchema, type RecordDateField, type RecordRow } from '../../shared/schemas/records';
import { api, describeError, download, fileNamePart } from '../services/api';
import { downloadFailed, recordFileWords, type RecordFileKind } from '../words/records';

/** The Records screen's filters as the form holds them; dates are calendar days on this device. */
export interface RecordFilters {
  state: JobState | null;
  craneUnitId: string | null;
  site: string;
  dateField: RecordDateField;
  /** YYYY-MM-DD or empty. */
  from: string;
  to: string;
}

export const emptyRecordFilters = (): RecordFilters => ({ state: null, craneUnitId: null, site: '', dateField: 'updated', from: '', to: '' });

const DAY = /^\d{4}-\d{2}-\d{2}$/;

/**
 * A calendar day typed on this device as the instant it starts (or the last millisecond before the
 * next day starts): a site manager's "3 December" is their own day, not UTC's.
 */
export function dayBoundary(day: string, end: 'start' | 'end'): string | null {
  if (!DAY.test(day)) return null;
  const [y, m, d] = day.split('-').map(Number);
  const start = new Date(y, m - 1, d);
  if (start.getFullYear() !== y || start.getMonth() !== m - 1 || start.getDate() !== d) return null;
  return end === 'start' ? start.toISOString() : new Date(new Date(y, m - 1, d + 1).getTime() - 1).toISOString();
}

/** The query string of GET /api/records; empty filters are left out. */
export function recordsQueryString(filters: RecordFilters, page: number, pageSize: number): string {
  const params = new URLSearchParams();
  if (filters.state) params.set('state', filters.state);
  if (filters.craneUnitId) params.set('craneUnitId', filters.craneUnitId);
  const site = filters.site.trim();
  if (site) params.set('site', site);
  const from = dayBoundary(filters.from, 'start');
  const to = dayBoundary(filters.to, 'end');
  if (from || to || filters.dateField !== 'updated') params.set('dateField', filters.dateField);
  if (from) params.set('from', from);
  if (to) params.set('to', to);
  params.set('page', String(page));
  params.set('pageSize', String(pageSize));
  return params.toString();
}

/** Where each of a job's record files is served. */
export function recordFilePath(jobId: string, kind: RecordFileKind): string {
  const id = encodeURIComponent(jobId);
  const file = { record: 'record.pdf', siteFile: 'site-file.zip', csv: 'events.csv', jsonl: 'events.jsonl' }[kind];
  return `/jobs/${id}/${file}`;
}

/** The saved file's name: the job's name, then what the file is. */
export function recordFileName(job: { id: string; name: string }, kind: RecordFileKind): string {
  return `${fileNamePart(job.name, `job-${job.id.slice(0, 8)}`)}-${recordFileWords[kind].suffix}`;
}

/** The Records screen: one page of jobs with their chains checked, and the record downloads. */
export const useRecordsStore = defineStore('records', () => {
  const rows = ref<RecordRow[]>([]);
  const total = ref(0);
  const page = ref(1);
  const pageSize = ref(25);
  const filters = reactive<RecordFilters>(emptyRecordFilters());
  const loading = ref(false);
  /** Why the list could not be loaded; empty when it was. */
  const problem = ref('');
  /** Whether a list has been answered at least once (the empty state needs it). */
  const loaded = ref(false);
  // Filters change faster than answers come: only the latest request's answer is shown.
  let latest = 0;

  async function load(nextPage = page.value, nextPageSize = pageSize.value): Promise<boolean> {
    const mine = ++latest;
    loading.value = true;
    problem.value = '';
    try {
      const answer = await api(`/records?${recordsQueryString(filters, nextPage, nextPageSize)}`, { schema: recordListSchema });
      if (mine !== latest) return false;
      rows.value = answer.items;
      total.value = answer.total;
      page.value = answer.page;
      pageSize.value = answer.pageSize;
      loaded.value = true;
      return true;
    } catch (error) {
      if (mine === latest) problem.value = describeError(error);
      return false;
    } finally {
      if (mine === latest) loading.value = false;
    }
  }

  function clearFilters(): Promise<boolean> {
    Object.assign(filters, emptyRecordFilters());
    return load(1);
  }

  const downloading = reactive(new Set<string>());
  /** The last download that failed, in words; cleared when the next one starts. */
  const downloadProblem = ref('');

  /** Downloads one of a job's record files; a failure is kept in `downloadProblem` and answers false. */
  async function downloadFile(job: { id: string; name: string }, kind: RecordFileKind): Promise<boolean> {
    const key = `${job.id}:${kind}`;
    if (downloading.has(key)) return false;
    downloading.add(key);
    downloadProblem.value = '';
    try {
      await download(recordFilePath(job.id, kind), recordFileName(job, kind));
      return true;
    } catch (error) {
      downloadProblem.value = downloadFailed(kind, describeError(error));
      return false;
    } finally {
      downloading.delete(key);
    }
  }

  return {
    rows,
    total,
    page,
    pageSize,
    filters,
    loading,
    loaded,
    problem,
    load,
    clearFilters,
    downloading,
    downloadProblem,
    downloadFile,
    isDownloading: (jobId: string, kind: RecordFileKind) => downloading.has(`${jobId}:${kind}`),
  };
});
