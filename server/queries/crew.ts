import { In, type EntityManager } from 'typeorm';
import type { CrewRole } from '../../shared/schemas/jobs.js';
import { JobCrew } from '../entities/JobCrew.js';

/** The roles a person holds on a job (none when they are not in its crew). */
export async function crewRolesOf(manager: EntityManager, jobId: string, userId: string): Promise<CrewRole[]> {
  return (await manager.findBy(JobCrew, { jobId, userId })).map((c) => c.role);
}

/** The roles a person holds on each job they are crew on, optionally only among `jobIds`. */
export async function crewRolesByJob(manager: EntityManager, userId: string, jobIds?: readonly string[]): Promise<Map<string, CrewRole[]>> {
  const rows = jobIds === undefined ? await manager.findBy(JobCrew, { userId }) : jobIds.length ? await manager.findBy(JobCrew, { userId, jobId: In([...jobIds]) }) : [];
  const byJob = new Map<string, CrewRole[]>();
  for (const c of rows) byJob.set(c.jobId, [...(byJob.get(c.jobId) ?? []), c.role]);
  return byJob;
}
