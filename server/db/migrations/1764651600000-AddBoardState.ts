import { TableColumn, type MigrationInterface, type QueryRunner } from 'typeorm';

/** The board projection kept on the job row, written with each event. */
export class AddBoardState1764651600000 implements MigrationInterface {
  name = 'AddBoardState1764651600000';

  async up(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.addColumn('job', new TableColumn({ name: 'board', type: 'text', isNullable: true }));
  }

  async down(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.dropColumn('job', 'board');
  }
}
