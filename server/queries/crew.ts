import { In, type EntityManager } from 'typeorm';
import type { CrewRole } from '../../shared/schemas/jobs.js';
import { JobCrew } from '../entities/JobCrew.js';
import { statement } from '../db/statements.js';

/** The roles a person holds on a job (none when they are not in its crew). */
export async function crewRolesOf(manager: EntityManager, jobId: string, userId: string): Promise<CrewRole[]> {
  // Asked on every board command and join: a prepared statement (server/db/statements.ts).
  const rows = statement(manager.connection, 'SELECT role FROM job_crew WHERE job_id = ? AND user_id = ?').all(jobId, userId) as { role: CrewRole }[];
  return rows.map((row) => row.role);
}

/** The roles a person holds on each job they are crew on, optionally only among `jobIds`. */
export async function crewRolesByJob(manager: EntityManager, userId: string, jobIds?: readonly string[]): Promise<Map<string, CrewRole[]>> {
  const rows = jobIds === undefined ? await manager.findBy(JobCrew, { userId }) : jobIds.length ? await manager.findBy(JobCrew, { userId, jobId: In([...jobIds]) }) : [];
  const byJob = new Map<string, CrewRole[]>();
  for (const c of rows) byJob.set(c.jobId, [...(byJob.get(c.jobId) ?? []), c.role]);
  return byJob;
}
