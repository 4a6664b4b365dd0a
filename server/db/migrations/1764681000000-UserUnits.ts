import { TableColumn, type MigrationInterface, type QueryRunner } from 'typeorm';

/**
 * Each person's system of units on screen, metric or US customary. Everyone who exists when this
 * runs keeps metric, the units every screen showed until now; figures stay stored in SI.
 */
export class UserUnits1764681000000 implements MigrationInterface {
  name = 'UserUnits1764681000000';

  async up(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.addColumn('user', new TableColumn({ name: 'units', type: 'varchar', length: '10', default: "'metric'" }));
  }

  async down(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.dropColumn('user', 'units');
  }
}
