import { Table, TableForeignKey, TableIndex, type MigrationInterface, type QueryRunner } from 'typeorm';

const fk = (column: string, table: string, onDelete: 'CASCADE' | 'RESTRICT' = 'RESTRICT') =>
  new TableForeignKey({ columnNames: [column], referencedTableName: table, referencedColumnNames: ['id'], onDelete });

/** Jobs, their crews, overrides and the hash-chained event log. */
export class CreateJobs1764644400000 implements MigrationInterface {
  name = 'CreateJobs1764644400000';

  async up(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.createTable(
      new Table({
        name: 'job',
        columns: [
          { name: 'id', type: 'varchar', length: '36', isPrimary: true },
          { name: 'name', type: 'varchar', length: '120' },
          { name: 'site', type: 'varchar', length: '200' },
          { name: 'crane_unit_id', type: 'varchar', length: '36' },
          { name: 'kind', type: 'varchar', length: '12' },
          { name: 'state', type: 'varchar', length: '12' },
          { name: 'configuration', type: 'text', isNullable: true },
          { name: 'results', type: 'text', isNullable: true },
          { name: 'distribution', type: 'text' },
          { name: 'comms_plan', type: 'text' },
          { name: 'plan_version', type: 'integer' },
          { name: 'last_seq', type: 'integer' },
          { name: 'head_hash', type: 'varchar', length: '64' },
          { name: 'created_by', type: 'varchar', length: '36' },
          { name: 'created_at', type: 'varchar', length: '30' },
          { name: 'updated_at', type: 'varchar', length: '30' },
        ],
        indices: [new TableIndex({ columnNames: ['state'] })],
        foreignKeys: [fk('crane_unit_id', 'crane_unit'), fk('created_by', 'user')],
      }),
    );
    await queryRunner.createTable(
      new Table({
        name: 'job_crew',
        columns: [
          { name: 'job_id', type: 'varchar', length: '36', isPrimary: true },
          { name: 'user_id', type: 'varchar', length: '36', isPrimary: true },
          { name: 'role', type: 'varchar', length: '12', isPrimary: true },
        ],
        indices: [new TableIndex({ columnNames: ['user_id'] })],
        foreignKeys: [fk('job_id', 'job', 'CASCADE'), fk('user_id', 'user')],
      }),
    );
    await queryRunner.createTable(
      new Table({
        name: 'job_override',
        columns: [
          { name: 'id', type: 'varchar', length: '36', isPrimary: true },
          { name: 'job_id', type: 'varchar', length: '36' },
          { name: 'figure_key', type: 'varchar', length: '80' },
          { name: 'figure_label', type: 'varchar', length: '200' },
          { name: 'figure_value', type: 'varchar', length: '200' },
          { name: 'reason', type: 'text' },
          { name: 'requested_by', type: 'varchar', length: '36' },
          { name: 'requested_at', type: 'varchar', length: '30' },
          { name: 'approved_by', type: 'varchar', length: '36', isNullable: true },
          { name: 'approved_at', type: 'varchar', length: '30', isNullable: true },
        ],
        indices: [new TableIndex({ columnNames: ['job_id'] })],
        foreignKeys: [fk('job_id', 'job', 'CASCADE'), fk('requested_by', 'user'), fk('approved_by', 'user')],
      }),
    );
    await queryRunner.createTable(
      new Table({
        name: 'job_event',
        columns: [
          { name: 'id', type: 'integer', isPrimary: true, isGenerated: true, generationStrategy: 'increment' },
          { name: 'job_id', type: 'varchar', length: '36' },
          { name: 'seq', type: 'integer' },
          { name: 'command_id', type: 'varchar', length: '36' },
          { name: 'command_hash', type: 'varchar', length: '64' },
          { name: 'type', type: 'varchar', length: '40' },
          { name: 'by_user_id', type: 'varchar', length: '36' },
          { name: 'by_name', type: 'varchar', length: '120' },
          { name: 'role', type: 'varchar', length: '12' },
          { name: 'at', type: 'varchar', length: '30' },
          { name: 'data', type: 'text' },
          { name: 'prev_hash', type: 'varchar', length: '64' },
          { name: 'hash', type: 'varchar', length: '64' },
        ],
        indices: [
          new TableIndex({ columnNames: ['job_id', 'seq'], isUnique: true }),
          new TableIndex({ columnNames: ['job_id', 'command_id'], isUnique: true }),
        ],
        foreignKeys: [fk('job_id', 'job')],
      }),
    );
  }

  async down(queryRunner: QueryRunner): Promise<void> {
    for (const table of ['job_event', 'job_override', 'job_crew', 'job']) await queryRunner.dropTable(table);
  }
}
