import { execFile, execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import { parse } from 'csv-parse/sync';
import type { Response } from 'superagent';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import yauzl from 'yauzl';
import { chainedEventSchema, type ChainedEvent } from '../../../shared/events/chain.js';
import { jobEventListSchema } from '../../../shared/events/log.js';
import { UNKNOWN_EVENT } from '../../../shared/events/sentences.js';
import { jobEnvelopeSchema, verifySchema } from '../../../shared/schemas/jobs.js';
import { DEMO_PASSWORD } from '../../../server/demo/people.js';
import { seedDemoIfEmpty } from '../../../server/demo/seed.js';
import { Upload } from '../../../server/entities/Upload.js';
import { signedInUser } from '../../helpers/auth.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

const run = promisify(execFile);
const root = path.resolve(import.meta.dirname, '../../..');

/** Reads a response body whole as bytes, whatever its type. */
function bytes(res: Response, done: (err: Error | null, body: Buffer) => void) {
  const chunks: Buffer[] = [];
  res.on('data', (c: Buffer) => chunks.push(c));
  res.on('end', () => done(null, Buffer.concat(chunks)));
}

/** Every entry of a zip, read back with yauzl: name and bytes. */
function unzip(buffer: Buffer): Promise<Map<string, Buffer>> {
  return new Promise((resolve, reject) => {
    yauzl.fromBuffer(buffer, { lazyEntries: true }, (err, zip) => {
      if (err) return reject(err);
      const files = new Map<string, Buffer>();
      zip.on('entry', (entry: yauzl.Entry) => {
        zip.openReadStream(entry, (e, stream) => {
          if (e) return reject(e);
          const chunks: Buffer[] = [];
          stream.on('data', (c: Buffer) => chunks.push(c));
          stream.on('end', () => {
            files.set(entry.fileName, Buffer.concat(chunks));
            zip.readEntry();
          });
        });
      });
      zip.on('end', () => resolve(files));
      zip.on('error', reject);
      zip.readEntry();
    });
  });
}

const lines = (text: string): ChainedEvent[] =>
  text
    .split('\n')
    .filter((l) => l.trim() !== '')
    .map((l) => chainedEventSchema.parse(JSON.parse(l)));

describe('the record leaving the server: events.jsonl, events.csv and the site file', () => {
  let server: TestServer;
  let work: string;
  let jobId: string;
  let lastSeq: number;
  /** The demo job's site zone (the server's, as the demo names none of its own for this job). */
  let zone: string;
  const tokens: Record<string, string> = {};
  const as = (who: string) => ({ Authorization: `Bearer ${tokens[who]}` });
  const download = async (who: string, file: string) =>
    (await request(server.app).get(`/api/jobs/${jobId}/${file}`).set(as(who)).buffer(true).parse(bytes).expect(200)).body as Buffer;

  beforeAll(async () => {
    work = mkdtempSync(path.join(os.tmpdir(), 'holdline-records-'));
    server = await startTestServer();
    await seedDemoIfEmpty(server.context);
    for (const who of ['supervisor', 'operator', 'viewer']) {
      tokens[who] = (await request(server.app).post('/api/auth/login').send({ email: `${who}@holdline.test`, password: DEMO_PASSWORD }).expect(200)).body.token as string;
    }
    const jobs = (await request(server.app).get('/api/jobs').set(as('supervisor')).expect(200)).body.items as { id: string; name: string }[];
    jobId = jobs.find((j) => j.name === 'Depot trial erection, 21 m')!.id;
    ({ lastSeq, timeZone: zone } = jobEnvelopeSchema.parse((await request(server.app).get(`/api/jobs/${jobId}`).set(as('supervisor')).expect(200)).body).job);
    // A driven erection has well over a hundred events.
    expect(lastSeq).toBeGreaterThan(100);
  }, 180_000);
  afterAll(async () => {
    await server?.stop();
    rmSync(work, { recursive: true, force: true });
  });

  it('events.jsonl holds every stored event in order with its chain, and its last hash is the verified final hash', async () => {
    const events = lines((await download('supervisor', 'events.jsonl')).toString('utf8'));
    expect(events.map((e) => e.seq)).toEqual(Array.from({ length: lastSeq }, (_, i) => i + 1));
    expect(events.every((e) => e.commandId.length > 0 && /^[0-9a-f]{64}$/.test(e.hash))).toBe(true);
    expect(events.slice(1).every((e, i) => e.prevHash === events[i].hash)).toBe(true);
    const verify = verifySchema.parse((await request(server.app).get(`/api/jobs/${jobId}/record/verify`).set(as('supervisor')).expect(200)).body);
    expect(verify.finalHash).toBe(events[events.length - 1].hash);
    expect(events.some((e) => e.redacted)).toBe(false);
  });

  it('blind-check values are kept for the job’s planners and redacted for the rest, as GET /events does; the checker says a redacted copy cannot be proved', async () => {
    const full = lines((await download('supervisor', 'events.jsonl')).toString('utf8'));
    const mine = lines((await download('operator', 'events.jsonl')).toString('utf8'));
    const withValues = full.filter((e) => e.type === 'hold.acknowledged' && e.data.values);
    // The demo's configuration-entry hold is acknowledged with the controller's values.
    expect(withValues.length).toBeGreaterThan(0);
    const redacted = mine.filter((e) => e.redacted);
    expect(redacted.map((e) => e.seq)).toEqual(full.filter((e) => (e.type === 'hold.acknowledged' && e.data.values) || e.type === 'hold.check.failed').map((e) => e.seq));
    expect(redacted.every((e) => e.data.values === null || e.data.fields === null)).toBe(true);
    // The same redaction as the events route gives the operator.
    const page = jobEventListSchema.parse((await request(server.app).get(`/api/jobs/${jobId}/events?after=0`).set(as('operator')).expect(200)).body);
    for (const line of redacted) expect(page.items.find((e) => e.seq === line.seq)?.data).toEqual(line.data);

    const file = path.join(work, 'operator.jsonl');
    writeFileSync(file, mine.map((e) => JSON.stringify(e)).join('\n'));
    const cli = await run('npm', ['run', '-s', 'verify-record', '--', file], { cwd: root }).then(
      () => ({ code: 0, out: '' }),
      (e: { code: number; stdout: string }) => ({ code: e.code, out: e.stdout }),
    );
    expect(cli.code).toBe(1);
    expect(cli.out).toContain(`BROKEN at event ${redacted[0].seq}`);
    expect(cli.out).toContain('blind-check values taken out');
  }, 30_000);

  it('events.csv read back by csv-parse has one row per event with its sentence and hash', async () => {
    const text = (await download('supervisor', 'events.csv')).toString('utf8');
    const rows = parse(text, { columns: true, bom: true, skip_empty_lines: true }) as Record<string, string>[];
    expect(Object.keys(rows[0])).toEqual(['seq', 'time (UTC)', `time at the site (${zone})`, 'who', 'role', 'what', 'details', 'hash']);
    expect(rows.map((r) => Number(r.seq))).toEqual(Array.from({ length: lastSeq }, (_, i) => i + 1));
    const events = lines((await download('supervisor', 'events.jsonl')).toString('utf8'));
    expect(rows.map((r) => r.hash)).toEqual(events.map((e) => e.hash));
    expect(rows.map((r) => r['time (UTC)'])).toEqual(events.map((e) => e.at));
    // Beside it, the site's clock with its offset, as the record PDF writes it (its zone's own test: tests/server/pdf/record-shifts-pdf.test.ts).
    for (const r of rows) expect(r[`time at the site (${zone})`]).toMatch(/^\d{1,2} [A-Z][a-z]{2} \d{4}, \d\d:\d\d:\d\d \(UTC[+\u2212]\d\d:\d\d\)$/);
    expect(rows.every((r) => r.what.length > 0 && r.what !== UNKNOWN_EVENT && r.who.length > 0)).toBe(true);
    expect(rows[0].what).toContain('Depot trial erection, 21 m');
    // Details are JSON a spreadsheet user can read; a long one is cut and says where the rest is.
    for (const r of rows) if (!r.details.endsWith('(cut; the whole data is in events.jsonl)')) expect(() => JSON.parse(r.details) as unknown).not.toThrow();
  });

  it('the site file zip holds the record PDF, the log as JSON Lines and CSV, the configuration and plan PDFs and every photo of the job', async () => {
    const zip = await download('supervisor', 'site-file.zip');
    const files = await unzip(zip);
    const names = [...files.keys()];
    expect(names).toEqual(expect.arrayContaining(['record.pdf', 'events.jsonl', 'events.csv', 'configuration.pdf']));
    expect(names.some((n) => /^plan-v\d+\.pdf$/.test(n))).toBe(true);
    for (const pdf of names.filter((n) => n.endsWith('.pdf'))) expect(files.get(pdf)!.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    expect(files.get('events.jsonl')!.toString('utf8')).toBe((await download('supervisor', 'events.jsonl')).toString('utf8'));

    // One final hash three ways: the route, the printed record's text, and the checker on the zip's own log.
    const verify = verifySchema.parse((await request(server.app).get(`/api/jobs/${jobId}/record/verify`).set(as('supervisor')).expect(200)).body);
    const printed = execFileSync('pdftotext', ['-raw', '-enc', 'UTF-8', '-', '-'], { input: files.get('record.pdf')! }).toString('utf8').replace(/\s+/g, '');
    expect(printed).toContain(verify.finalHash!);
    const zipped = path.join(work, 'zipped-events.jsonl');
    writeFileSync(zipped, files.get('events.jsonl')!);
    const { stdout } = await run('npm', ['run', '-s', 'verify-record', '--', zipped, '--expect', verify.finalHash!], { cwd: root });
    expect(stdout).toContain(`Final hash: ${verify.finalHash}`);
    expect(stdout).toContain(`it is the hash of event ${lastSeq}`);

    const photos = await server.context.dataSource.manager.findBy(Upload, { ownerId: jobId });
    const boardPhotos = photos.filter((p) => p.ownerKind !== null && p.ownerKind !== 'inspection');
    expect(boardPhotos.length).toBeGreaterThan(0);
    const inZip = names.filter((n) => n.startsWith('photos/'));
    expect(inZip).toHaveLength(boardPhotos.length);
    for (const photo of boardPhotos) {
      const name = inZip.find((n) => n.endsWith(photo.storedName))!;
      expect(files.get(name)!.length).toBe(photo.sizeBytes);
    }
  }, 180_000);

  it('the viewer’s site file carries the redacted log and says so', async () => {
    const files = await unzip(await download('viewer', 'site-file.zip'));
    expect(lines(files.get('events.jsonl')!.toString('utf8')).some((e) => e.redacted)).toBe(true);
    expect(files.get('README.txt')!.toString('utf8')).toContain('Blind-check values are taken out');
  }, 180_000);

  it('a live job’s site file says where its logs end', async () => {
    const jobs = (await request(server.app).get('/api/jobs').set(as('supervisor')).expect(200)).body.items as { id: string; name: string }[];
    const liveId = jobs.find((j) => j.name === 'Transformer T2 lift: boom erection')!.id;
    const live = jobEnvelopeSchema.parse((await request(server.app).get(`/api/jobs/${liveId}`).set(as('supervisor')).expect(200)).body).job;
    const res = await request(server.app).get(`/api/jobs/${liveId}/site-file.zip`).set(as('supervisor')).buffer(true).parse(bytes).expect(200);
    const files = await unzip(res.body as Buffer);
    expect(files.get('README.txt')!.toString('utf8')).toContain(`events.jsonl and events.csv end at event ${live.lastSeq}`);
    expect(lines(files.get('events.jsonl')!.toString('utf8'))).toHaveLength(live.lastSeq);
  }, 180_000);

  it('the three downloads are streamed (chunked, no length known up front) with a file name', async () => {
    for (const [file, type] of [['events.jsonl', 'application/x-ndjson'], ['events.csv', 'text/csv'], ['site-file.zip', 'application/zip']] as const) {
      const res = await request(server.app).get(`/api/jobs/${jobId}/${file}`).set(as('supervisor')).buffer(true).parse(bytes).expect(200);
      expect(res.headers['transfer-encoding']).toBe('chunked');
      expect(res.headers['content-length']).toBeUndefined();
      expect(res.headers['content-type']).toContain(type);
      expect(res.headers['content-disposition']).toMatch(new RegExp(`^attachment; filename="?job-[0-9a-f]{8}-${file.replace('.', '\\.')}"?$`));
    }
  }, 180_000);

  it('only people who may read the job download its log; a malformed expected hash is refused', async () => {
    // A qualified supervisor on no crew of the job reads none of it (a job's data is its crew's and the
    // administrators'); nobody signed out gets anything.
    const outsider = (await signedInUser(server, { qualifications: ['supervisor'] })).token;
    for (const file of ['events.csv', 'events.jsonl', 'site-file.zip']) {
      await request(server.app).get(`/api/jobs/${jobId}/${file}`).expect(401);
      const refused = await request(server.app).get(`/api/jobs/${jobId}/${file}`).set({ Authorization: `Bearer ${outsider}` });
      expect([refused.status, refused.body.error?.code], file).toEqual([403, 'forbidden']);
    }
    await request(server.app).get(`/api/jobs/${jobId}/record/verify?expect=1234`).set(as('supervisor')).expect(400);
  }, 180_000);
});
