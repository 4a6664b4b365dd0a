import { once } from 'node:events';
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { ZipArchive } from 'archiver';
import { stringify } from 'csv-stringify';
import { Router, type Response } from 'express';
import type { EntityManager } from 'typeorm';
import { z } from 'zod';
import { hashSchema } from '../../shared/events/chain.js';
import { describeEvent, type EventWordsContext } from '../../shared/events/sentences.js';
import { roleLabel } from '../../shared/schemas/users.js';
import { siteDateTime } from '../../shared/time.js';
import type { AppContext } from '../context.js';
import { CraneModel } from '../entities/CraneModel.js';
import { CraneUnit } from '../entities/CraneUnit.js';
import { Job } from '../entities/Job.js';
import { JobPlan } from '../entities/JobPlan.js';
import type { JobEvent } from '../entities/JobEvent.js';
import { Upload } from '../entities/Upload.js';
import { parseOrThrow } from '../errors.js';
import { chainedEventOf, storedEvents, verifyJobChain } from '../events/chain.js';
import { renderPdf } from '../pdf/pool.js';
import { can, canSeeUpload } from '../policies/index.js';
import { redactEventFor } from '../presenters/board.js';
import { presentJobEvent } from '../presenters/job-event.js';
import { redactPlan } from '../presenters/plan.js';
import { jobFor } from '../queries/jobs.js';
import { loadJobFor } from './job-access.js';
import { recordPdfFor, type RecordReader } from './record-pdf.js';

// A hash copied from paper may be typed in capitals; the log's hashes are lowercase.
const verifyQuerySchema = z.object({ expect: z.string().trim().toLowerCase().pipe(hashSchema).optional() });

/** Longest "details" cell of the CSV; the whole data is in events.jsonl. */
const CSV_DETAILS_MAX = 600;

/**
 * The CSV's columns, in order; their headings are what a spreadsheet shows. The site's clock (with
 * its offset, as on every screen and in the record PDF) sits beside the UTC time, which stays as
 * the exact stored value; the heading names the job's zone.
 */
const csvColumnsFor = (zone: string) => [
  { key: 'seq', header: 'seq' },
  { key: 'time', header: 'time (UTC)' },
  { key: 'siteTime', header: `time at the site (${zone})` },
  { key: 'who', header: 'who' },
  { key: 'role', header: 'role' },
  { key: 'what', header: 'what' },
  { key: 'details', header: 'details' },
  { key: 'hash', header: 'hash' },
] as const;
type CsvKey = ReturnType<typeof csvColumnsFor>[number]['key'];

/** Who is reading the log and so what of it they may see: the job's planners see blind-check values, everyone else gets them redacted as GET /events does. */
type Reader = RecordReader;

/** One stored row as the reader may see it: the event for sentences, and whether its data was cut. */
function readRow(row: JobEvent, planner: boolean) {
  const event = presentJobEvent(row);
  const shown = redactEventFor(event, planner);
  return { event: shown, redacted: shown !== event };
}

/**
 * The export's end, read in turn with the writers: an export streams a consistent prefix of the
 * log (every event up to this seq) even while the crew keep working.
 */
async function headOf(context: AppContext, jobId: string): Promise<number> {
  return context.queue.run(async () => (await context.dataSource.manager.findOneByOrFail(Job, { id: jobId })).lastSeq);
}

/** events.jsonl: one stored event per line with its chain, a redacted line marked so; up to `until`, or the head when it starts. */
async function* jsonLines(context: AppContext, reader: Reader, until?: number): AsyncGenerator<string> {
  until ??= await headOf(context, reader.job.id);
  for await (const row of storedEvents(context.dataSource.manager, reader.job.id, until)) {
    const { event, redacted } = readRow(row, reader.planner);
    const line = redacted ? { ...chainedEventOf(row), data: event.data, redacted: true } : chainedEventOf(row);
    yield `${JSON.stringify(line)}\n`;
  }
}

/** The names and people event sentences need, from every plan version the job had (latest first). */
async function wordsContext(manager: EntityManager, reader: Reader): Promise<EventWordsContext> {
  const plans = await manager.find(JobPlan, { where: { jobId: reader.job.id }, order: { version: 'DESC' } });
  const dto = await jobFor(manager, reader.job, reader.actor);
  return { names: { stages: plans.flatMap((p) => p.plan.stages) }, crew: dto.crew, overrides: dto.overrides };
}

/** A short JSON of an event's data for a spreadsheet cell; the effects (states the event set) are left out as the "what" says them. */
function detailsCell(data: Record<string, unknown>): string {
  const { effects: _effects, ...rest } = data;
  const text = JSON.stringify(rest);
  return text.length <= CSV_DETAILS_MAX ? text : `${text.slice(0, CSV_DETAILS_MAX)}… (cut; the whole data is in events.jsonl)`;
}

/** events.csv rows, one per event. */
async function* csvRows(context: AppContext, reader: Reader, until?: number): AsyncGenerator<Record<CsvKey, string | number>> {
  const { manager } = context.dataSource;
  const words = await wordsContext(manager, reader);
  until ??= await headOf(context, reader.job.id);
  for await (const row of storedEvents(manager, reader.job.id, until)) {
    const { event } = readRow(row, reader.planner);
    yield { seq: row.seq, time: row.at, siteTime: siteDateTime(row.at, reader.job.timeZone, { seconds: true }), who: row.byName, role: roleLabel(row.role), what: describeEvent(event, words), details: detailsCell(event.data), hash: row.hash };
  }
}

function csvStream(context: AppContext, reader: Reader, until?: number): Readable {
  // Cells a spreadsheet would run as a formula (=, +, -, @ first) are escaped: reasons are typed by people.
  const csv = stringify({ header: true, columns: csvColumnsFor(reader.job.timeZone), escape_formulas: true, bom: true });
  const rows = Readable.from(csvRows(context, reader, until));
  // pipe() does not pass a failed read on; without this the download would hang instead of failing.
  rows.on('error', (error) => csv.destroy(error));
  return rows.pipe(csv);
}

/** The configuration sheet, when the job has a configuration. */
async function configurationPdf(manager: EntityManager, reader: Reader, now: Date): Promise<Buffer | null> {
  if (!reader.job.configuration) return null;
  const unit = await manager.findOneByOrFail(CraneUnit, { id: reader.job.craneUnitId });
  const model = await manager.findOneByOrFail(CraneModel, { id: unit.modelId });
  return renderPdf({ kind: 'configuration', job: await jobFor(manager, reader.job, reader.actor), results: reader.job.results, arrangement: model.arrangement, printedAt: now.toISOString() });
}

/** The current plan's checklist, redacted for non-planners as GET /plan.pdf does. */
async function planPdf(manager: EntityManager, reader: Reader, now: Date): Promise<{ name: string; pdf: Buffer } | null> {
  const row = await manager.findOneBy(JobPlan, { jobId: reader.job.id, version: reader.job.planVersion });
  if (!row) return null;
  const plan = reader.planner ? row.plan : redactPlan(row.plan);
  return { name: `plan-v${row.version}.pdf`, pdf: await renderPdf({ kind: 'plan', job: await jobFor(manager, reader.job, reader.actor), plan, version: row.version, printedAt: now.toISOString() }) };
}

/** The job's board photos this reader may see (the same rule as GET /uploads/:id). */
async function jobPhotos(manager: EntityManager, reader: Reader): Promise<Upload[]> {
  const uploads = await manager.find(Upload, { where: { ownerId: reader.job.id }, order: { createdAt: 'ASC', id: 'ASC' } });
  return uploads.filter((u) => u.ownerKind !== null && u.ownerKind !== 'inspection' && canSeeUpload(reader.actor, u, reader.crewRoles));
}

const fileStem = (job: Job) => `job-${job.id.slice(0, 8)}`;

function streamTo(res: Response, source: Readable): Promise<void> {
  // A client that goes away ends the pipeline; the log is only read, so nothing is left half done.
  return pipeline(source, res).catch((error: unknown) => {
    if (!res.headersSent) throw error;
    res.destroy(error instanceof Error ? error : undefined);
  });
}

/** The job's record leaving the server: its verification, the log as JSON Lines and CSV, and the site file. */
export function recordsRouter(context: AppContext): Router {
  const router = Router();
  const { manager } = context.dataSource;
  const readerOf = async (req: Parameters<typeof loadJobFor>[1]): Promise<Reader> => {
    const { job, actor, crewRoles } = await loadJobFor(context, req, 'jobs.read');
    return { job, actor, crewRoles, planner: can(actor, 'jobs.plan', { crewRoles }) };
  };

  // Read through the queue so a half-written command is never seen as a broken chain.
  router.get('/jobs/:jobId/record/verify', async (req, res) => {
    const { job } = await loadJobFor(context, req, 'jobs.read');
    const { expect } = parseOrThrow(verifyQuerySchema, req.query, 'query');
    const { problem: _problem, ...answer } = await context.queue.run(() => verifyJobChain(manager, job.id, expect ?? null));
    res.json(answer);
  });

  router.get('/jobs/:jobId/events.jsonl', async (req, res) => {
    const reader = await readerOf(req);
    // attachment() sets a type from the extension, so the type is set after it.
    res.attachment(`${fileStem(reader.job)}-events.jsonl`).type('application/x-ndjson');
    await streamTo(res, Readable.from(jsonLines(context, reader)));
  });

  router.get('/jobs/:jobId/events.csv', async (req, res) => {
    const reader = await readerOf(req);
    res.attachment(`${fileStem(reader.job)}-events.csv`).type('text/csv; charset=utf-8');
    await streamTo(res, csvStream(context, reader));
  });

  router.get('/jobs/:jobId/site-file.zip', async (req, res) => {
    const reader = await readerOf(req);
    const now = context.now();
    // Everything that can fail before the first byte is made first, so a failure is still a clean error answer.
    const [record, configuration, plan, photos] = await Promise.all([recordPdfFor(context, reader), configurationPdf(manager, reader, now), planPdf(manager, reader, now), jobPhotos(manager, reader)]);
    // Both logs in the zip end at the same event, even while the crew keep working.
    const until = await headOf(context, reader.job.id);
    const zip = new ZipArchive({ zlib: { level: 6 } });
    let appended = 0;
    let written = 0;
    zip.on('entry', () => {
      written += 1;
    });
    const add = (source: Buffer | Readable | string, name: string) => {
      zip.append(source, { name });
      appended += 1;
    };
    const notes: string[] = [];
    add(record, 'record.pdf');
    add(Readable.from(jsonLines(context, reader, until)), 'events.jsonl');
    add(csvStream(context, reader, until), 'events.csv');
    if (configuration) add(configuration, 'configuration.pdf');
    else notes.push('configuration.pdf is not in this file: the job has no configuration yet.');
    if (plan) add(plan.pdf, plan.name);
    else notes.push('No plan PDF: the job has no plan yet.');
    // A download given up half way closes the zip; waiting for its next entry then stops too.
    const closed = new AbortController();
    zip.once('close', () => closed.abort());
    const photosAndEnd = async () => {
      for (const photo of photos) {
        // One photo file open at a time: the next is opened once the zip has written everything before it.
        while (written < appended) await once(zip, 'entry', { signal: closed.signal });
        const stored = await context.storage.get(photo.storedName);
        if (stored) add(stored.stream, `photos/${photo.createdAt.replace(/[:.]/g, '-')}-${photo.ownerKind}-${photo.storedName}`);
        else notes.push(`Photo ${photo.id} is missing from storage.`);
      }
      if (reader.job.state !== 'complete' && reader.job.state !== 'cancelled') {
        notes.push(`The job was still open when this file was made: events.jsonl and events.csv end at event ${until}; the record PDF names the event its final hash is for, and may end a few events earlier.`);
      }
      if (!reader.planner) notes.push('Blind-check values are taken out of this copy of the log (lines marked "redacted"); the job’s supervisors can download the whole log.');
      if (notes.length) add(`${notes.join('\n')}\n`, 'README.txt');
      await zip.finalize();
    };
    res.attachment(`${fileStem(reader.job)}-site-file.zip`).type('application/zip');
    const filling = photosAndEnd().catch((error: unknown) => zip.destroy(error instanceof Error ? error : undefined));
    await streamTo(res, zip);
    await filling;
  });

  return router;
}
