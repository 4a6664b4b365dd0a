import type { EntityManager } from 'typeorm';
import type { JobEventDto } from '../../shared/events/log.js';
import { JobEvent } from '../entities/JobEvent.js';
import { redactEventFor } from '../presenters/board.js';
import { presentJobEvent } from '../presenters/job-event.js';

/**
 * A job's events after `afterSeq`, oldest first, as one person may read them: the blind check
 * stays blind, so values and failed fields reach only the job's planners. The HTTP events page
 * and a rejoining board both read through this.
 */
export async function eventsAfter(manager: EntityManager, jobId: string, afterSeq: number, options: { planner: boolean; limit?: number }): Promise<JobEventDto[]> {
  const query = manager.createQueryBuilder(JobEvent, 'e').where('e.job_id = :jobId AND e.seq > :afterSeq', { jobId, afterSeq }).orderBy('e.seq', 'ASC');
  const events = await (options.limit === undefined ? query : query.limit(options.limit)).getMany();
  return events.map((e) => redactEventFor(presentJobEvent(e), options.planner));
}
