import { Table, TableColumn, TableForeignKey, type MigrationInterface, type QueryRunner } from 'typeorm';
import { applyEvent } from '../../../shared/board/apply.js';
import type { BoardState } from '../../../shared/board/types.js';
import { presentJobEvent } from '../../presenters/job-event.js';

/**
 * The board leaves the job row for a table of its own, `job_board`, written every so many events
 * instead of with each one: rewriting tens of kilobytes of JSON (and the row around it) was most
 * of a board command's cost. Each job's current board becomes its first snapshot, at its last seq.
 */
export class BoardSnapshots1764677400000 implements MigrationInterface {
  name = 'BoardSnapshots1764677400000';

  async up(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.createTable(
      new Table({
        name: 'job_board',
        columns: [
          { name: 'job_id', type: 'varchar', length: '36', isPrimary: true },
          { name: 'seq', type: 'integer' },
          { name: 'board', type: 'text' },
        ],
        foreignKeys: [new TableForeignKey({ columnNames: ['job_id'], referencedTableName: 'job', referencedColumnNames: ['id'], onDelete: 'CASCADE' })],
      }),
    );
    await queryRunner.query('INSERT INTO job_board (job_id, seq, board) SELECT id, last_seq, board FROM job WHERE board IS NOT NULL');
    await queryRunner.dropColumn('job', 'board');
  }

  /** Back on the job row, brought up to each job's last event with the same reducer. */
  async down(queryRunner: QueryRunner): Promise<void> {
    const boards = new Map<string, BoardState>();
    const snapshots = (await queryRunner.query('SELECT job_id, seq, board FROM job_board')) as { job_id: string; seq: number; board: string }[];
    for (const snapshot of snapshots) {
      let board = JSON.parse(snapshot.board) as BoardState;
      const events = (await queryRunner.query('SELECT * FROM job_event WHERE job_id = ? AND seq > ? ORDER BY seq', [snapshot.job_id, snapshot.seq])) as Record<string, unknown>[];
      for (const row of events) {
        board = applyEvent(board, presentJobEvent({ jobId: row.job_id as string, seq: row.seq as number, type: row.type as string, at: row.at as string, byUserId: row.by_user_id as string, byName: row.by_name as string, role: row.role as string, data: JSON.parse(row.data as string) as Record<string, unknown> }));
      }
      boards.set(snapshot.job_id, board);
    }
    // The snapshots go first: rebuilding the job table to add the column would otherwise touch the rows that refer to it.
    await queryRunner.dropTable('job_board');
    await queryRunner.addColumn('job', new TableColumn({ name: 'board', type: 'text', isNullable: true }));
    for (const [jobId, board] of boards) await queryRunner.query('UPDATE job SET board = ? WHERE id = ?', [JSON.stringify(board), jobId]);
  }
}
