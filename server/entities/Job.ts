import { Column, Entity, PrimaryColumn } from 'typeorm';
import { configurationSchema, type Configuration } from '../../shared/schemas/configuration.js';
import type { CommsPlan, JobKind, JobState } from '../../shared/schemas/jobs.js';
import type { ConfigurationResults } from '../../shared/planner/types.js';
import type { BoardState } from '../../shared/board/types.js';

/**
 * A job's current state: a projection of its event log, written in the same transaction as each
 * event. `lastSeq` and `headHash` close the hash chain.
 */
@Entity('job')
export class Job {
  @PrimaryColumn('varchar', { length: 36 })
  id!: string;

  @Column('varchar', { length: 120 })
  name!: string;

  @Column('varchar', { length: 200 })
  site!: string;

  @Column('varchar', { length: 36, name: 'crane_unit_id' })
  craneUnitId!: string;

  @Column('varchar', { length: 12 })
  kind!: JobKind;

  @Column('varchar', { length: 12 })
  state!: JobState;

  /** The site's IANA time zone; every time about the job is shown in it with its UTC offset (shared/time.ts). */
  @Column('varchar', { length: 64, name: 'time_zone', default: 'UTC' })
  timeZone!: string;

  /**
   * Read through the shared schema so that a configuration saved before a field existed gains
   * that field's default; one that no longer parses is left as stored for the planner to refuse.
   */
  @Column('simple-json', {
    nullable: true,
    transformer: {
      to: (value: Configuration | null) => value,
      from: (value: unknown) => {
        if (value === null || value === undefined) return null;
        const parsed = configurationSchema.safeParse(value);
        return parsed.success ? parsed.data : value;
      },
    },
  })
  configuration!: Configuration | null;

  /** The server's computation of the configuration. */
  @Column('simple-json', { nullable: true })
  results!: ConfigurationResults | null;

  @Column('simple-json')
  distribution!: string[];

  /** How long a hold waits for an absent crew member before they are e-mailed (server/mail/hold-reminders.ts). */
  @Column('integer', { name: 'hold_reminder_minutes', default: 10 })
  holdReminderMinutes!: number;

  /**
   * The board as the shared reducer builds it from the log; the snapshot clients start from. Not
   * a column: it is kept in `job_board` every so many events and brought up to `lastSeq` by
   * `CommittedJobs.read` (server/db/committed-jobs.ts), the only way a job with its board is read.
   */
  board!: BoardState | null;

  @Column('simple-json', { name: 'comms_plan' })
  commsPlan!: CommsPlan;

  @Column('integer', { name: 'plan_version' })
  planVersion!: number;

  @Column('integer', { name: 'last_seq' })
  lastSeq!: number;

  @Column('varchar', { length: 64, name: 'head_hash' })
  headHash!: string;

  @Column('varchar', { length: 36, name: 'created_by' })
  createdBy!: string;

  @Column('varchar', { length: 30, name: 'created_at' })
  createdAt!: string;

  @Column('varchar', { length: 30, name: 'updated_at' })
  updatedAt!: string;
}
