import { Column, Entity, PrimaryColumn } from 'typeorm';
import type { Plan } from '../../shared/schemas/plan.js';

/**
 * A job's plan. Version 0 is the draft edited while planning; versions 1, 2, … are locked copies
 * (the first at `ready`, later ones by revision) and are never changed.
 */
@Entity('job_plan')
export class JobPlan {
  @PrimaryColumn('varchar', { length: 36, name: 'job_id' })
  jobId!: string;

  @PrimaryColumn('integer')
  version!: number;

  @Column('simple-json')
  plan!: Plan;

  /** Hash of the configuration and communications plan the draft was generated from. */
  @Column('varchar', { length: 64, name: 'source_hash' })
  sourceHash!: string;

  /** The draft was changed by hand, so a new configuration does not regenerate it silently. */
  @Column('boolean')
  edited!: boolean;

  @Column('varchar', { length: 500 })
  reason!: string;

  @Column('varchar', { length: 36, name: 'created_by' })
  createdBy!: string;

  @Column('varchar', { length: 30, name: 'created_at' })
  createdAt!: string;
}
