import { TableColumn, type MigrationInterface, type QueryRunner } from 'typeorm';

/**
 * The end of a job: people the admin marks as qualified to inspect an assembled crane, and the
 * configuration a crane unit was last built to, written when a job's final hold is released.
 */
export class JobEnding1764662400000 implements MigrationInterface {
  name = 'JobEnding1764662400000';

  async up(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.addColumn('user', new TableColumn({ name: 'can_inspect', type: 'boolean', default: false }));
    await queryRunner.addColumn('crane_unit', new TableColumn({ name: 'as_built', type: 'text', isNullable: true }));
  }

  async down(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.dropColumn('crane_unit', 'as_built');
    await queryRunner.dropColumn('user', 'can_inspect');
  }
}
