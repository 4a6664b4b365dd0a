import { Table, type MigrationInterface, type QueryRunner } from 'typeorm';

/** People who may sign in. */
export class CreateUsers1764633600000 implements MigrationInterface {
  name = 'CreateUsers1764633600000';

  async up(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.createTable(
      new Table({
        name: 'user',
        columns: [
          { name: 'id', type: 'varchar', length: '36', isPrimary: true },
          { name: 'email', type: 'varchar', length: '254', isUnique: true },
          { name: 'display_name', type: 'varchar', length: '120' },
          { name: 'password_hash', type: 'varchar', length: '100', isNullable: true },
          { name: 'qualifications', type: 'text' },
          { name: 'is_admin', type: 'boolean', default: false },
          { name: 'active', type: 'boolean', default: true },
          { name: 'created_at', type: 'varchar', length: '30' },
          { name: 'updated_at', type: 'varchar', length: '30' },
        ],
      }),
    );
  }

  async down(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.dropTable('user');
  }
}
