import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';

/**
 * One event of a job's log, appended in the same transaction as the change it records. Never
 * updated or deleted by the application; `hash` chains it to the one before.
 */
@Entity('job_event')
export class JobEvent {
  @PrimaryGeneratedColumn('increment')
  id!: number;

  @Column('varchar', { length: 36, name: 'job_id' })
  jobId!: string;

  @Column('integer')
  seq!: number;

  @Column('varchar', { length: 36, name: 'command_id' })
  commandId!: string;

  /** SHA-256 of the command's canonical JSON: a repeated id with another body is refused. */
  @Column('varchar', { length: 64, name: 'command_hash' })
  commandHash!: string;

  @Column('varchar', { length: 40 })
  type!: string;

  @Column('varchar', { length: 36, name: 'by_user_id' })
  byUserId!: string;

  @Column('varchar', { length: 120, name: 'by_name' })
  byName!: string;

  @Column('varchar', { length: 12 })
  role!: string;

  @Column('varchar', { length: 30 })
  at!: string;

  @Column('simple-json')
  data!: Record<string, unknown>;

  @Column('varchar', { length: 64, name: 'prev_hash' })
  prevHash!: string;

  @Column('varchar', { length: 64 })
  hash!: string;
}
