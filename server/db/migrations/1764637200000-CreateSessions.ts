import { Table, TableForeignKey, TableIndex, type MigrationInterface, type QueryRunner } from 'typeorm';

/** Refresh-token families, e-mailed sign-in links and the sign-in audit. */
export class CreateSessions1764637200000 implements MigrationInterface {
  name = 'CreateSessions1764637200000';

  async up(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.createTable(
      new Table({
        name: 'refresh_token',
        columns: [
          { name: 'id', type: 'varchar', length: '36', isPrimary: true },
          { name: 'family_id', type: 'varchar', length: '36' },
          { name: 'user_id', type: 'varchar', length: '36' },
          { name: 'token_hash', type: 'varchar', length: '64', isUnique: true },
          { name: 'created_at', type: 'varchar', length: '30' },
          { name: 'family_expires_at', type: 'varchar', length: '30' },
          { name: 'rotated_at', type: 'varchar', length: '30', isNullable: true },
          { name: 'revoked_at', type: 'varchar', length: '30', isNullable: true },
        ],
        indices: [new TableIndex({ columnNames: ['family_id'] }), new TableIndex({ columnNames: ['user_id'] })],
        foreignKeys: [new TableForeignKey({ columnNames: ['user_id'], referencedTableName: 'user', referencedColumnNames: ['id'], onDelete: 'CASCADE' })],
      }),
    );
    await queryRunner.createTable(
      new Table({
        name: 'sign_in_link',
        columns: [
          { name: 'id', type: 'varchar', length: '36', isPrimary: true },
          { name: 'user_id', type: 'varchar', length: '36' },
          { name: 'kind', type: 'varchar', length: '12' },
          { name: 'token_hash', type: 'varchar', length: '64', isUnique: true },
          { name: 'created_at', type: 'varchar', length: '30' },
          { name: 'expires_at', type: 'varchar', length: '30' },
          { name: 'used_at', type: 'varchar', length: '30', isNullable: true },
        ],
        foreignKeys: [new TableForeignKey({ columnNames: ['user_id'], referencedTableName: 'user', referencedColumnNames: ['id'], onDelete: 'CASCADE' })],
      }),
    );
    await queryRunner.createTable(
      new Table({
        name: 'sign_in_audit',
        columns: [
          { name: 'id', type: 'integer', isPrimary: true, isGenerated: true, generationStrategy: 'increment' },
          { name: 'at', type: 'varchar', length: '30' },
          { name: 'kind', type: 'varchar', length: '24' },
          { name: 'email', type: 'varchar', length: '254', isNullable: true },
          { name: 'user_id', type: 'varchar', length: '36', isNullable: true },
          { name: 'ip', type: 'varchar', length: '64', isNullable: true },
          { name: 'detail', type: 'varchar', length: '300', isNullable: true },
        ],
        indices: [new TableIndex({ columnNames: ['at'] })],
      }),
    );
  }

  async down(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.dropTable('sign_in_audit');
    await queryRunner.dropTable('sign_in_link');
    await queryRunner.dropTable('refresh_token');
  }
}
