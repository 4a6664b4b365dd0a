import { readlinkSync } from 'node:fs';
import os from 'node:os';
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

/**
 * Lowers this thread's CPU priority (nice +10) below the event loop's. On a machine with few cores
 * the worker and the event loop share them, and a record takes seconds of CPU: at equal priority
 * a board command waits for its time slice behind the drawing. A PDF may come a little later; a
 * command should not. On Linux a thread is a task with its own id (`/proc/thread-self` links to
 * `<pid>/task/<tid>`) and setpriority on that id changes that thread alone, not the process.
 * Elsewhere (no /proc) or where it is refused, the worker runs at the process's priority.
 */
function lowerThreadPriority(): void {
  try {
    const tid = Number(readlinkSync('/proc/thread-self').split('/').pop());
    if (Number.isInteger(tid) && tid > 0 && tid !== process.pid) os.setPriority(tid, Math.min(19, os.getPriority(tid) + 10));
  } catch {
    // Not Linux, or not allowed: nothing to lower.
  }
}
lowerThreadPriority();

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
