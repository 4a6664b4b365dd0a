import { parseJobEvent, type JobEventDto } from '../../shared/events/log.js';
import type { JobEvent } from '../entities/JobEvent.js';

/** An event as the API and the board present it, read through the event log's schema. */
export function presentJobEvent(event: Pick<JobEvent, 'jobId' | 'seq' | 'type' | 'at' | 'byUserId' | 'byName' | 'role' | 'data'>): JobEventDto {
  return parseJobEvent({
    jobId: event.jobId,
    seq: event.seq,
    type: event.type,
    at: event.at,
    by: { userId: event.byUserId, name: event.byName, role: event.role },
    data: event.data,
  });
}
