import type { EntityManager } from 'typeorm';
import type { CrewRole } from '../../shared/schemas/jobs.js';
import { JobCrew } from '../entities/JobCrew.js';

/** The roles a person holds on a job (none when they are not in its crew). */
export async function crewRolesOf(manager: EntityManager, jobId: string, userId: string): Promise<CrewRole[]> {
  return (await manager.findBy(JobCrew, { jobId, userId })).map((c) => c.role);
}
