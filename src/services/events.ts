import { jobEventListSchema, type JobEventDto } from '../../shared/events/log';
import { api } from './api';

/**
 * A job's events after `afterSeq`, in seq order: the one way the client reads the event log over
 * HTTP (the board's gap filling, the board's feed, the job page's log). The server answers one page
 * at a time, so this asks again until the log's last seq is reached; a page that brings nothing
 * new ends it too (events a person may not see are left out of their pages).
 */
export async function fetchEventsAfter(jobId: string, afterSeq: number): Promise<JobEventDto[]> {
  const out: JobEventDto[] = [];
  let after = afterSeq;
  for (;;) {
    const page = await api(`/jobs/${encodeURIComponent(jobId)}/events?after=${after}`, { schema: jobEventListSchema });
    const fresh = page.items.filter((e) => e.seq > after);
    if (!fresh.length) break;
    out.push(...fresh);
    after = fresh[fresh.length - 1].seq;
    if (after >= page.lastSeq) break;
  }
  return out;
}
