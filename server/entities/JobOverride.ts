import { Column, Entity, PrimaryColumn } from 'typeorm';

/** A supervisor's override of a failing figure, valid once a second person approves it. */
@Entity('job_override')
export class JobOverride {
  @PrimaryColumn('varchar', { length: 36 })
  id!: string;

  @Column('varchar', { length: 36, name: 'job_id' })
  jobId!: string;

  @Column('varchar', { length: 80, name: 'figure_key' })
  figureKey!: string;

  @Column('varchar', { length: 200, name: 'figure_label' })
  figureLabel!: string;

  /** The figure's value when the override was asked for; a changed value ends the override. */
  @Column('varchar', { length: 200, name: 'figure_value' })
  figureValue!: string;

  @Column('text')
  reason!: string;

  @Column('varchar', { length: 36, name: 'requested_by' })
  requestedBy!: string;

  @Column('varchar', { length: 30, name: 'requested_at' })
  requestedAt!: string;

  @Column('varchar', { length: 36, name: 'approved_by', nullable: true })
  approvedBy!: string | null;

  @Column('varchar', { length: 30, name: 'approved_at', nullable: true })
  approvedAt!: string | null;
}
