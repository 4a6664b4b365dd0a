import { parentPort, threadId } from 'node:worker_threads';
import { renderTask, type PdfTask } from './tasks.js';

/** A message from the pool: one task with the id its answer carries back. */
export interface PdfRequest {
  id: number;
  task: PdfTask;
}
/** The answer: the PDF's bytes (transferred, not copied) or what went wrong. */
export type PdfAnswer = { id: number; ok: true; pdf: Uint8Array; threadId: number } | { id: number; ok: false; message: string };

const port = parentPort;
if (!port) throw new Error('server/pdf/worker.ts runs only as a worker thread (see server/pdf/pool.ts).');

port.on('message', (request: PdfRequest) => {
  renderTask(request.task).then(
    (pdf) => {
      // A copy of its own, so its memory can be handed over without touching a shared pool slab.
      const bytes = new Uint8Array(pdf);
      const answer: PdfAnswer = { id: request.id, ok: true, pdf: bytes, threadId };
      port.postMessage(answer, [bytes.buffer]);
    },
    (error: unknown) => {
      const answer: PdfAnswer = { id: request.id, ok: false, message: error instanceof Error ? (error.stack ?? error.message) : String(error) };
      port.postMessage(answer);
    },
  );
});
