import sharp from 'sharp';
import { buildRecord, type RecordContext } from '../../shared/record/record.js';
import { redactEventFor } from '../presenters/board.js';
import { presentJobEvent } from '../presenters/job-event.js';
import type { RecordPdfInput } from './record.js';

/** One stored event as read from `job_event`, its data still the stored JSON text. */
export interface StoredEventRow {
  jobId: string;
  seq: number;
  type: string;
  at: string;
  byUserId: string;
  byName: string;
  role: string;
  data: string;
}

/**
 * A record PDF to draw from the job's log. The server reads the rows, the people and the photo
 * files (the database and the storage live on its thread); everything pure that follows (reading
 * each event through the log's schema, redacting it for the reader, replaying the log into the
 * record, turning thumbnails into JPEG) is left to the PDF worker, so it costs the event loop
 * nothing while a board command waits.
 */
export interface RecordLogTask {
  kind: 'record-log';
  /** Every event up to the head the task's `context.finalHash` names, in seq order. */
  rows: StoredEventRow[];
  /** The job's planners see which blind-check fields differed; everyone else gets them redacted. */
  planner: boolean;
  context: RecordContext;
  drawings: RecordPdfInput['drawings'];
  /** Stored thumbnails (as stored, WebP) of the photos the log names that this reader may see. */
  thumbnails: { id: string; bytes: Uint8Array }[];
  printedAt: string;
}

/** Longest side of a photo in the record, in pixels: about 300 dpi at the printed thumbnail's width. */
const THUMBNAIL_PX = 640;

/** The record PDF's input from the job's log, as the reader may see it (runs in the PDF worker; a test may run it anywhere). */
export async function recordInputFromLog(task: RecordLogTask): Promise<RecordPdfInput> {
  const events = task.rows.map((row) => redactEventFor(presentJobEvent({ ...row, data: JSON.parse(row.data) as Record<string, unknown> }), task.planner));
  const record = buildRecord(events, task.context);
  const named = new Set(record.photoIds);
  // pdfkit draws JPEG and PNG only; thumbnails are stored as WebP.
  const photos = await Promise.all(
    task.thumbnails
      .filter((t) => named.has(t.id))
      .map(async (t) => ({
        id: t.id,
        jpeg: new Uint8Array(await sharp(t.bytes).resize(THUMBNAIL_PX, THUMBNAIL_PX, { fit: 'inside', withoutEnlargement: true }).jpeg({ quality: 75 }).toBuffer()),
      })),
  );
  return { record, drawings: task.drawings, photos, printedAt: task.printedAt };
}
