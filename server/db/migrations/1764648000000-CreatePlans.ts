import { Table, TableForeignKey, type MigrationInterface, type QueryRunner } from 'typeorm';

/** Plan drafts and locked plan versions. */
export class CreatePlans1764648000000 implements MigrationInterface {
  name = 'CreatePlans1764648000000';

  async up(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.createTable(
      new Table({
        name: 'job_plan',
        columns: [
          { name: 'job_id', type: 'varchar', length: '36', isPrimary: true },
          { name: 'version', type: 'integer', isPrimary: true },
          { name: 'plan', type: 'text' },
          { name: 'source_hash', type: 'varchar', length: '64' },
          { name: 'edited', type: 'boolean' },
          { name: 'reason', type: 'varchar', length: '500' },
          { name: 'created_by', type: 'varchar', length: '36' },
          { name: 'created_at', type: 'varchar', length: '30' },
        ],
        foreignKeys: [
          new TableForeignKey({ columnNames: ['job_id'], referencedTableName: 'job', referencedColumnNames: ['id'], onDelete: 'CASCADE' }),
          new TableForeignKey({ columnNames: ['created_by'], referencedTableName: 'user', referencedColumnNames: ['id'] }),
        ],
      }),
    );
  }

  async down(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.dropTable('job_plan');
  }
}
