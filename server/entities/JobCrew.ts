import { Entity, PrimaryColumn } from 'typeorm';
import type { CrewRole } from '../../shared/schemas/jobs.js';

/** A person in a crew role on a job. A role may be held by several people. */
@Entity('job_crew')
export class JobCrew {
  @PrimaryColumn('varchar', { length: 36, name: 'job_id' })
  jobId!: string;

  @PrimaryColumn('varchar', { length: 36, name: 'user_id' })
  userId!: string;

  @PrimaryColumn('varchar', { length: 12 })
  role!: CrewRole;
}
