import { Column, Entity, PrimaryColumn } from 'typeorm';
import type { BoardState } from '../../shared/board/types.js';

/**
 * A job's board as the shared reducer built it from the log up to `seq`: where a cold read of the
 * board starts, the events after `seq` applied to it (server/db/committed-jobs.ts). Written
 * every `BOARD_SNAPSHOT_EVERY` events, not with each one: the board is tens of kilobytes of JSON.
 */
@Entity('job_board')
export class JobBoard {
  @PrimaryColumn('varchar', { length: 36, name: 'job_id' })
  jobId!: string;

  @Column('integer')
  seq!: number;

  @Column('simple-json')
  board!: BoardState;
}
