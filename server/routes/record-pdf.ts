import { mkdir, readFile, rename, writeFile } from 'node:fs/promises';
import path from 'node:path';
import type { Readable } from 'node:stream';
import { Router } from 'express';
import sharp from 'sharp';
import { In } from 'typeorm';
import { buildRecord } from '../../shared/record/record.js';
import type { CrewRole } from '../../shared/schemas/jobs.js';
import type { AppContext } from '../context.js';
import { CraneModel } from '../entities/CraneModel.js';
import { CraneUnit } from '../entities/CraneUnit.js';
import { Job } from '../entities/Job.js';
import { JobEvent } from '../entities/JobEvent.js';
import { Upload } from '../entities/Upload.js';
import { User } from '../entities/User.js';
import { renderPdf } from '../pdf/pool.js';
import type { RecordPdfInput } from '../pdf/record.js';
import { can, canSeeUpload } from '../policies/index.js';
import { redactEventFor } from '../presenters/board.js';
import { presentJobEvent } from '../presenters/job-event.js';
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

/** Longest side of a photo in the record, in pixels: about 300 dpi at the printed thumbnail's width. */
const THUMBNAIL_PX = 640;

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

/** The job row and its events up to its head, read in turn with the writers: the events and the head hash belong together. */
async function readLog(context: AppContext, jobId: string): Promise<{ job: Job; rows: JobEvent[] }> {
  const { manager } = context.dataSource;
  return context.queue.run(async () => {
    const job = await manager.findOneByOrFail(Job, { id: jobId });
    const stored = await manager.find(JobEvent, { where: { jobId }, order: { seq: 'ASC' } });
    return { job, rows: stored.filter((r) => r.seq <= job.lastSeq) };
  });
}

/** What the record PDF of a job is drawn from, for one reader (exported for the benchmark that renders it in the main thread for contrast). */
export async function recordPdfInputFor(context: AppContext, reader: RecordReader, log?: { job: Job; rows: JobEvent[] }): Promise<RecordPdfInput> {
  const { manager } = context.dataSource;
  const { job, rows } = log ?? (await readLog(context, reader.job.id));
  const events = rows.map((r) => redactEventFor(presentJobEvent(r), reader.planner));
  const unit = await manager.findOneByOrFail(CraneUnit, { id: job.craneUnitId });
  const model = await manager.findOneByOrFail(CraneModel, { id: unit.modelId });
  const crewIds = [...new Set(events.flatMap((e) => (e.type === 'crew.set' || e.type === 'job.created' ? e.data.crew.map((c) => c.userId) : [])))];
  const people = crewIds.length ? await manager.findBy(User, { id: In(crewIds) }) : [];
  const qualificationsOf = Object.fromEntries(people.map((p) => [p.id, p.qualifications]));
  const record = buildRecord(events, {
    finalHash: job.headHash,
    crane: `${unit.fleetNumber} — ${model.arrangement.manufacturer} ${model.arrangement.model}`,
    qualificationsOf,
    inspectors: people.filter((p) => p.canInspect).map((p) => p.id),
    figures: job.results?.figures ?? null,
    defaultTimeZone: context.config.timeZone,
  });

  const uploads = record.photoIds.length ? await manager.findBy(Upload, { id: In(record.photoIds) }) : [];
  const photos: { id: string; jpeg: Uint8Array }[] = [];
  for (const upload of uploads) {
    if (!canSeeUpload(reader.actor, upload, reader.crewRoles)) continue;
    const stored = await context.storage.get(upload.thumbnailName);
    if (!stored) continue;
    // pdfkit draws JPEG and PNG only; thumbnails are stored as WebP. sharp works off the event loop.
    const jpeg = await sharp(await bytesOf(stored.stream)).resize(THUMBNAIL_PX, THUMBNAIL_PX, { fit: 'inside', withoutEnlargement: true }).jpeg({ quality: 75 }).toBuffer();
    photos.push({ id: upload.id, jpeg: new Uint8Array(jpeg) });
  }
  return {
    record,
    drawings: job.configuration && job.results ? { configuration: job.configuration, results: job.results, arrangement: model.arrangement } : null,
    photos,
    printedAt: context.now().toISOString(),
  };
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
  if (!cacheFile) return renderPdf({ kind: 'record', ...(await recordPdfInputFor(context, reader, log)) });
  const cached = await readFile(cacheFile).catch(() => null);
  if (cached) return cached;
  // Asked for twice before the first is written (a download and the completion e-mail): rendered once.
  let rendering = renderingNow.get(cacheFile);
  if (!rendering) {
    rendering = (async () => {
      const pdf = await renderPdf({ kind: 'record', ...(await recordPdfInputFor(context, reader, log)) });
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
