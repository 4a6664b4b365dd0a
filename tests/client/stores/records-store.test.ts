import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import type { RecordList, RecordRow } from '../../../shared/schemas/records';
import { dayBoundary, emptyRecordFilters, recordFileName, recordsQueryString, useRecordsStore } from '../../../src/stores/records';
import { verificationWords } from '../../../src/words/records';
import { json, JOB_ID, UNIT_ID } from '../api-fakes';

type FetchArgs = [input: string, init?: RequestInit];

function row(overrides: Partial<RecordRow> = {}): RecordRow {
  return {
    id: JOB_ID,
    name: 'Boom erection for the pump house',
    site: 'Riverside works',
    kind: 'erection',
    state: 'complete',
    timeZone: 'Europe/Warsaw',
    craneUnitId: UNIT_ID,
    craneFleetNumber: 'CC-11',
    createdAt: '2026-10-01T07:00:00.000Z',
    updatedAt: '2026-10-02T15:00:00.000Z',
    endedAt: '2026-10-02T15:00:00.000Z',
    lastSeq: 40,
    finalHash: 'a'.repeat(64),
    verification: { valid: true, checked: 40, firstBadSeq: null, finalHash: 'a'.repeat(64) },
    ...overrides,
  };
}
const page = (items: RecordRow[], total = items.length, p = 1, pageSize = 25): RecordList => ({ items, total, page: p, pageSize });

describe('records store helpers', () => {
  it('leaves empty filters out of the query and always names the page', () => {
    expect(recordsQueryString(emptyRecordFilters(), 1, 25)).toBe('page=1&pageSize=25');
    const q = new URLSearchParams(recordsQueryString({ ...emptyRecordFilters(), state: 'live', craneUnitId: UNIT_ID, site: '  Quay 4 ' }, 3, 50));
    expect(Object.fromEntries(q)).toEqual({ state: 'live', craneUnitId: UNIT_ID, site: 'Quay 4', page: '3', pageSize: '50' });
  });

  it('turns a calendar day on this device into the first and last millisecond of that local day', () => {
    const start = new Date(dayBoundary('2026-12-03', 'start')!);
    const end = new Date(dayBoundary('2026-12-03', 'end')!);
    expect([start.getFullYear(), start.getMonth(), start.getDate(), start.getHours(), start.getMinutes(), start.getSeconds(), start.getMilliseconds()]).toEqual([2026, 11, 3, 0, 0, 0, 0]);
    expect([end.getDate(), end.getHours(), end.getMinutes(), end.getSeconds(), end.getMilliseconds()]).toEqual([3, 23, 59, 59, 999]);
    const next = new Date(end.getTime() + 1);
    expect([next.getDate(), next.getHours()]).toEqual([4, 0]);
    expect(dayBoundary('2026-02-30', 'start')).toBeNull();
    expect(dayBoundary('3/12/2026', 'start')).toBeNull();
    expect(dayBoundary('', 'end')).toBeNull();
  });

  it('sends the date field with a date range, and the range as instants', () => {
    const q = new URLSearchParams(recordsQueryString({ ...emptyRecordFilters(), dateField: 'ended', from: '2026-12-01', to: '2026-12-03' }, 1, 25));
    expect(q.get('dateField')).toBe('ended');
    expect(q.get('from')).toBe(dayBoundary('2026-12-01', 'start'));
    expect(q.get('to')).toBe(dayBoundary('2026-12-03', 'end'));
  });

  it('names saved files after the job, and says a broken chain with the event number in words', () => {
    expect(recordFileName({ id: JOB_ID, name: 'T2 lift: boom erection' }, 'siteFile')).toBe('T2-lift-boom-erection-site-file.zip');
    expect(verificationWords({ valid: false, checked: 6, firstBadSeq: 7 })).toMatchObject({ label: 'Chain broken at event 7', icon: 'gpp_bad' });
    expect(verificationWords({ valid: true, checked: 40, firstBadSeq: null })).toMatchObject({ label: 'Chain verified', icon: 'verified' });
  });
});

describe('records store', () => {
  let fetchMock: ReturnType<typeof vi.fn<(...args: FetchArgs) => Promise<Response>>>;

  beforeEach(() => {
    setActivePinia(createPinia());
    fetchMock = vi.fn<(...args: FetchArgs) => Promise<Response>>();
    vi.stubGlobal('fetch', fetchMock);
  });
  afterEach(() => {
    vi.unstubAllGlobals();
    vi.restoreAllMocks();
  });

  it('loads a page with the filters and keeps the total for the table', async () => {
    fetchMock.mockResolvedValueOnce(json(200, page([row()], 31, 2, 10)));
    const records = useRecordsStore();
    records.filters.state = 'complete';
    expect(await records.load(2, 10)).toBe(true);
    expect(fetchMock.mock.calls[0][0]).toBe('/api/records?state=complete&page=2&pageSize=10');
    expect(records.rows.map((r) => r.id)).toEqual([JOB_ID]);
    expect([records.total, records.page, records.pageSize, records.loaded, records.loading]).toEqual([31, 2, 10, true, false]);
  });

  it('shows only the latest request’s answer when filters change faster than answers come', async () => {
    let answerFirst: (r: Response) => void = () => {};
    fetchMock.mockImplementationOnce(() => new Promise<Response>((resolve) => (answerFirst = resolve)));
    fetchMock.mockResolvedValueOnce(json(200, page([row({ id: 'second', name: 'Second' })])));
    const records = useRecordsStore();
    const first = records.load(1);
    records.filters.site = 'quay';
    await records.load(1);
    answerFirst(json(200, page([row({ id: 'first' })])));
    expect(await first).toBe(false);
    expect(records.rows.map((r) => r.id)).toEqual(['second']);
    expect(records.loading).toBe(false);
  });

  it('keeps the server’s reason when the list cannot be loaded, and an answer it does not understand is a problem too', async () => {
    fetchMock.mockResolvedValueOnce(json(400, { error: { code: 'validation', message: 'At most 100 rows a page.' } }));
    const records = useRecordsStore();
    expect(await records.load(1, 25)).toBe(false);
    expect(records.problem).toBe('At most 100 rows a page.');
    fetchMock.mockResolvedValueOnce(json(200, { items: [{ id: 'x' }], total: 1, page: 1, pageSize: 25 }));
    expect(await records.load(1, 25)).toBe(false);
    expect(records.problem).toMatch(/does not understand/);
    expect(records.rows).toEqual([]);
  });

  it('a download that fails says which file and why; one that works clears the message and saves the file', async () => {
    const clicked: string[] = [];
    vi.spyOn(URL, 'createObjectURL').mockImplementation(() => 'blob:test/1');
    vi.spyOn(URL, 'revokeObjectURL').mockImplementation(() => {});
    vi.spyOn(HTMLAnchorElement.prototype, 'click').mockImplementation(function (this: HTMLAnchorElement) {
      clicked.push(this.download);
    });
    const records = useRecordsStore();
    const job = { id: JOB_ID, name: 'Pump house' };
    fetchMock.mockResolvedValueOnce(json(404, { error: { code: 'not_found', message: 'No such job.' } }));
    expect(await records.downloadFile(job, 'record')).toBe(false);
    expect(fetchMock.mock.calls[0][0]).toBe(`/api/jobs/${JOB_ID}/record.pdf`);
    expect(records.downloadProblem).toBe('Record PDF could not be downloaded. No such job. Try again; if it keeps failing, tell your administrator.');
    expect(records.isDownloading(JOB_ID, 'record')).toBe(false);

    fetchMock.mockResolvedValueOnce(new Response('seq,time\n', { status: 200, headers: { 'Content-Type': 'text/csv' } }));
    expect(await records.downloadFile(job, 'csv')).toBe(true);
    expect(fetchMock.mock.calls[1][0]).toBe(`/api/jobs/${JOB_ID}/events.csv`);
    expect(clicked).toEqual(['Pump-house-events.csv']);
    expect(records.downloadProblem).toBe('');

    fetchMock.mockRejectedValueOnce(new TypeError('Failed to fetch'));
    expect(await records.downloadFile(job, 'siteFile')).toBe(false);
    expect(records.downloadProblem).toMatch(/^Site file could not be downloaded\. No connection to the Holdline server/);
  });
});
