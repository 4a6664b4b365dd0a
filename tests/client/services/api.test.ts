// The client's one way of saving a file: a fetched PDF and a Blob the page already holds go
// through saveFile, whose object URL must outlive the click long enough for the browser to read it.
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { ApiRequestError, download, fileNamePart, saveFile } from '../../../src/services/api';

let created: Blob[] = [];
let revoked: string[] = [];
let clicked: { href: string; download: string; inDocument: boolean }[] = [];

beforeEach(() => {
  vi.useFakeTimers();
  created = [];
  revoked = [];
  clicked = [];
  vi.spyOn(URL, 'createObjectURL').mockImplementation((blob: Blob | MediaSource) => {
    if (!(blob instanceof Blob)) throw new Error('a Blob was expected');
    created.push(blob);
    return `blob:test/${created.length}`;
  });
  vi.spyOn(URL, 'revokeObjectURL').mockImplementation((url: string) => {
    revoked.push(url);
  });
  vi.spyOn(HTMLAnchorElement.prototype, 'click').mockImplementation(function (this: HTMLAnchorElement) {
    clicked.push({ href: this.getAttribute('href') ?? '', download: this.download, inDocument: document.body.contains(this) });
  });
});

afterEach(() => {
  vi.useRealTimers();
  vi.restoreAllMocks();
  vi.unstubAllGlobals();
});

describe('saveFile', () => {
  it('clicks one link named for the file, from the document, and leaves no link behind', () => {
    saveFile(new Blob(['{"id":"x"}'], { type: 'application/json' }), 'model-x.json');
    expect(clicked).toEqual([{ href: 'blob:test/1', download: 'model-x.json', inDocument: true }]);
    expect(document.querySelectorAll('a').length).toBe(0);
  });

  it('keeps the object URL valid while the browser may still be reading it, then frees it', () => {
    saveFile(new Blob(['%PDF']), 'sheet.pdf');
    // Revoking on the next turn can cancel a download that has not read the Blob yet.
    vi.advanceTimersByTime(30_000);
    expect(revoked).toEqual([]);
    vi.advanceTimersByTime(60_000);
    expect(revoked).toEqual(['blob:test/1']);
  });
});

describe('download', () => {
  it('saves what the server sent under the given name', async () => {
    const fetchMock = vi.fn(async () => new Response('%PDF-1.7 sheet', { status: 200, headers: { 'Content-Type': 'application/pdf' } }));
    vi.stubGlobal('fetch', fetchMock);
    await download('/jobs/j1/configuration.pdf', 'configuration-CC-11.pdf');
    expect(fetchMock).toHaveBeenCalledWith('/api/jobs/j1/configuration.pdf', expect.objectContaining({ method: 'GET' }));
    expect(clicked.map((c) => c.download)).toEqual(['configuration-CC-11.pdf']);
    expect(await created[0].text()).toBe('%PDF-1.7 sheet');
  });

  it('saves nothing when the server refuses, and says why', async () => {
    vi.stubGlobal('fetch', async () => new Response(JSON.stringify({ error: { code: 'not_found', message: 'No such job.' } }), { status: 404 }));
    const error = await download('/jobs/none/plan.pdf', 'plan.pdf').catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ApiRequestError);
    expect(error).toMatchObject({ status: 404, code: 'not_found', message: 'No such job.' });
    expect(created).toEqual([]);
    expect(clicked).toEqual([]);
  });
});

describe('fileNamePart', () => {
  it('turns a fleet number and job name into the name the browser tests expect', () => {
    // The same name tests/e2e/planner.test.ts reads from the real download.
    expect(fileNamePart('CC-11 Boom erection for the pump house', 'job')).toBe('CC-11-Boom-erection-for-the-pump-house');
  });

  it('drops path and shell characters, trims dashes at the ends and keeps at most 80 characters', () => {
    expect(fileNamePart('../../etc/passwd', 'job')).toBe('..-..-etc-passwd');
    expect(fileNamePart('  CC/7 : “north” gate  ', 'job')).toBe('CC-7-north-gate');
    expect(fileNamePart('a'.repeat(120), 'job')).toHaveLength(80);
  });

  it('falls back when nothing usable is left', () => {
    expect(fileNamePart(' ::: ', 'job')).toBe('job');
    expect(fileNamePart('', 'job')).toBe('job');
  });
});
