import type { JobEventDto } from '../../shared/schemas/jobs.js';
import type { JobEvent } from '../entities/JobEvent.js';

/** An event as the API and the board present it. */
export function presentJobEvent(event: JobEvent): JobEventDto {
  return {
    jobId: event.jobId,
    seq: event.seq,
    type: event.type,
    at: event.at,
    by: { userId: event.byUserId, name: event.byName, role: event.role },
    data: event.data,
  };
}
