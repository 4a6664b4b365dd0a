import { mkdir, readFile, rename, writeFile } from 'node:fs/promises';
import path from 'node:path';
import type { Readable } from 'node:stream';
import { Router } from 'express';
import { In } from 'typeorm';
import type { CrewRole } from '../../shared/schemas/jobs.js';
import type { AppContext } from '../context.js';
import { CraneModel } from '../entities/CraneModel.js';
import { CraneUnit } from '../entities/CraneUnit.js';
import { Job } from '../entities/Job.js';
import { Upload } from '../entities/Upload.js';
import { User } from '../entities/User.js';
import { statement } from '../db/statements.js';
import { renderPdf } from '../pdf/pool.js';
import type { RecordPdfInput } from '../pdf/record.js';
import { recordInputFromLog, type RecordLogTask, type StoredEventRow } from '../pdf/record-input.js';
import { can, canSeeUpload } from '../policies/index.js';
import { loadJobFor } from './job-access.js';

/** Who asks for the record, and so what of the log they may see. */
export interface RecordReader {
  job: Job;
  actor: User;
  crewRoles: CrewRole[];
  /** The job's planners see which blind-check fields differed; everyone else gets them redacted. */
  planner: boolean;
}

/** What a reader sees of the record: it names the cached file, so one audience never gets another's copy. */
function audienceOf(reader: RecordReader): string {
  // Board photos are for whoever reads the job: canSeeUpload asks the same `jobs.read` row.
  const photos = can(reader.actor, 'jobs.read', { crewRoles: reader.crewRoles });
  return `${reader.planner ? 'planners' : 'crew'}${photos ? '' : '-no-photos'}`;
}

const finished = (state: string) => state === 'complete' || state === 'cancelled';

async function bytesOf(stream: Readable): Promise<Buffer> {
  const chunks: Buffer[] = [];
  for await (const chunk of stream) chunks.push(Buffer.isBuffer(chunk) ? chunk : Buffer.from(String(chunk)));
  return Buffer.concat(chunks);
}

/** Where a finished job's record is kept once rendered: by its final hash, per audience. */
export function cachedRecordPath(context: AppContext, jobId: string, finalHash: string, audience: string): string {
  return path.join(context.config.dataDir, 'records', `${jobId}-${finalHash}-${audience}.pdf`);
}

/** A job's log as the record needs it: the rows, and the crew and photos they name. */
interface StoredLog {
  job: Job;
  rows: StoredEventRow[];
  /** Everyone a `job.created` or `crew.set` event put on the crew. */
  crewIds: string[];
  /** Every photo id an event's data names (the record's photos are among them). */
  photoIds: string[];
}

// Read through prepared statements with the data left as JSON text: TypeORM's hydration of the
// whole log (and the JSON parsing) cost the event loop 10-15 ms per record; the worker parses it.
// The crew and photo ids are picked out by SQLite's JSON functions, so the event loop never
// builds the events at all.
const LOG_ROWS = 'SELECT job_id AS jobId, seq, type, at, by_user_id AS byUserId, by_name AS byName, role, data FROM job_event WHERE job_id = ? AND seq <= ? ORDER BY seq';
const LOG_CREW =
  "SELECT DISTINCT json_extract(c.value, '$.userId') AS id FROM job_event e, json_each(e.data, '$.crew') c WHERE e.job_id = ? AND e.seq <= ? AND e.type IN ('job.created', 'crew.set')";
const LOG_PHOTOS = "SELECT DISTINCT json_extract(data, '$.photoId') AS id FROM job_event WHERE job_id = ? AND seq <= ? AND json_extract(data, '$.photoId') IS NOT NULL";

/** The job row and its events up to its head, read in turn with the writers: the events and the head hash belong together. */
async function readLog(context: AppContext, jobId: string): Promise<StoredLog> {
  const { dataSource } = context;
  return context.queue.run(async () => {
    const job = await dataSource.manager.findOneByOrFail(Job, { id: jobId });
    const ids = (sql: string) => (statement(dataSource, sql).all(jobId, job.lastSeq) as { id: unknown }[]).flatMap((r) => (typeof r.id === 'string' ? [r.id] : []));
    return {
      job,
      rows: statement(dataSource, LOG_ROWS).all(jobId, job.lastSeq) as StoredEventRow[],
      crewIds: ids(LOG_CREW),
      photoIds: ids(LOG_PHOTOS),
    };
  });
}

/**
 * The record PDF's task for one reader: what only the server's thread can read (the log, the
 * crane, the people, the photo files this reader may see), for the PDF worker to build the record
 * from and draw.
 */
export async function recordTaskFor(context: AppContext, reader: RecordReader, log?: StoredLog): Promise<RecordLogTask> {
  const { manager } = context.dataSource;
  const { job, rows, crewIds, photoIds } = log ?? (await readLog(context, reader.job.id));
  const unit = await manager.findOneByOrFail(CraneUnit, { id: job.craneUnitId });
  const model = await manager.findOneByOrFail(CraneModel, { id: unit.modelId });
  const people = crewIds.length ? await manager.findBy(User, { id: In(crewIds) }) : [];
  const uploads = photoIds.length ? await manager.findBy(Upload, { id: In(photoIds) }) : [];
  const visible = uploads.filter((upload) => canSeeUpload(reader.actor, upload, reader.crewRoles));
  const thumbnails = await Promise.all(
    visible.map(async (upload) => {
      const stored = await context.storage.get(upload.thumbnailName);
      return stored ? [{ id: upload.id, bytes: new Uint8Array(await bytesOf(stored.stream)) }] : [];
    }),
  );
  return {
    kind: 'record-log',
    rows,
    planner: reader.planner,
    context: {
      finalHash: job.headHash,
      crane: `${unit.fleetNumber} — ${model.arrangement.manufacturer} ${model.arrangement.model}`,
      qualificationsOf: Object.fromEntries(people.map((p) => [p.id, p.qualifications])),
      inspectors: people.filter((p) => p.canInspect).map((p) => p.id),
      figures: job.results?.figures ?? null,
      defaultTimeZone: context.config.timeZone,
    },
    drawings: job.configuration && job.results ? { configuration: job.configuration, results: job.results, arrangement: model.arrangement } : null,
    thumbnails: thumbnails.flat(),
    printedAt: context.now().toISOString(),
  };
}

/** What the record PDF of a job is drawn from, for one reader, built in the calling thread (for the test that draws it on the event loop for contrast). */
export async function recordPdfInputFor(context: AppContext, reader: RecordReader): Promise<RecordPdfInput> {
  return recordInputFromLog(await recordTaskFor(context, reader));
}

/**
 * The record PDF of a job for one reader. A finished job's log can no longer change, so its record
 * is rendered once and then read from the data folder; a live job's is rendered each time, in a
 * worker thread, from a consistent prefix of the log.
 */
export async function recordPdfFor(context: AppContext, reader: RecordReader): Promise<Buffer> {
  const log = await readLog(context, reader.job.id);
  const { job } = log;
  const cacheFile = finished(job.state) ? cachedRecordPath(context, job.id, job.headHash, audienceOf(reader)) : null;
  if (!cacheFile) return renderPdf(await recordTaskFor(context, reader, log));
  const cached = await readFile(cacheFile).catch(() => null);
  if (cached) return cached;
  // Asked for twice before the first is written (a download and the completion e-mail): rendered once.
  let rendering = renderingNow.get(cacheFile);
  if (!rendering) {
    rendering = (async () => {
      const pdf = await renderPdf(await recordTaskFor(context, reader, log));
      await mkdir(path.dirname(cacheFile), { recursive: true, mode: 0o700 });
      // Written aside and renamed, so a reader never gets half a file.
      const partial = `${cacheFile}.${process.pid}.${Date.now()}.partial`;
      await writeFile(partial, pdf, { mode: 0o600 });
      await rename(partial, cacheFile);
      return pdf;
    })().finally(() => renderingNow.delete(cacheFile));
    renderingNow.set(cacheFile, rendering);
  }
  return rendering;
}

/** Finished records being rendered now, by their cache file. */
const renderingNow = new Map<string, Promise<Buffer>>();

/** GET /api/jobs/:jobId/record.pdf: the job's record, live or finished. */
export function recordPdfRouter(context: AppContext): Router {
  const router = Router();
  router.get('/jobs/:jobId/record.pdf', async (req, res) => {
    const { job, actor, crewRoles } = await loadJobFor(context, req, 'jobs.read');
    const pdf = await recordPdfFor(context, { job, actor, crewRoles, planner: can(actor, 'jobs.plan', { crewRoles }) });
    res.type('application/pdf').attachment(`record-${job.id.slice(0, 8)}.pdf`).send(pdf);
  });
  return router;
}
