import { Table, TableForeignKey, TableIndex, type MigrationInterface, type QueryRunner } from 'typeorm';

const fk = (column: string, table: string, onDelete: 'CASCADE' | 'RESTRICT' | 'SET NULL' = 'RESTRICT') =>
  new TableForeignKey({ columnNames: [column], referencedTableName: table, referencedColumnNames: ['id'], onDelete });

/** Uploads, crane models, units, assist cranes, components and their inspections. */
export class CreateFleet1764640800000 implements MigrationInterface {
  name = 'CreateFleet1764640800000';

  async up(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.createTable(
      new Table({
        name: 'upload',
        columns: [
          { name: 'id', type: 'varchar', length: '36', isPrimary: true },
          { name: 'stored_name', type: 'varchar', length: '80' },
          { name: 'thumbnail_name', type: 'varchar', length: '80' },
          { name: 'mime_type', type: 'varchar', length: '20' },
          { name: 'size_bytes', type: 'integer' },
          { name: 'width_px', type: 'integer' },
          { name: 'height_px', type: 'integer' },
          { name: 'uploaded_by', type: 'varchar', length: '36' },
          { name: 'created_at', type: 'varchar', length: '30' },
          { name: 'owner_kind', type: 'varchar', length: '16', isNullable: true },
          { name: 'owner_id', type: 'varchar', length: '36', isNullable: true },
        ],
        indices: [new TableIndex({ columnNames: ['owner_kind', 'owner_id'] })],
        foreignKeys: [fk('uploaded_by', 'user')],
      }),
    );
    await queryRunner.createTable(
      new Table({
        name: 'crane_model',
        columns: [
          { name: 'id', type: 'varchar', length: '36', isPrimary: true },
          { name: 'arrangement_id', type: 'varchar', length: '64', isUnique: true },
          { name: 'arrangement', type: 'text' },
          { name: 'created_at', type: 'varchar', length: '30' },
          { name: 'updated_at', type: 'varchar', length: '30' },
        ],
      }),
    );
    await queryRunner.createTable(
      new Table({
        name: 'crane_unit',
        columns: [
          { name: 'id', type: 'varchar', length: '36', isPrimary: true },
          { name: 'fleet_number', type: 'varchar', length: '32', isUnique: true },
          { name: 'model_id', type: 'varchar', length: '36' },
          { name: 'serial_number', type: 'varchar', length: '64' },
          { name: 'location', type: 'varchar', length: '120' },
          { name: 'notes', type: 'text' },
          { name: 'created_at', type: 'varchar', length: '30' },
          { name: 'updated_at', type: 'varchar', length: '30' },
        ],
        foreignKeys: [fk('model_id', 'crane_model')],
      }),
    );
    await queryRunner.createTable(
      new Table({
        name: 'assist_crane',
        columns: [
          { name: 'id', type: 'varchar', length: '36', isPrimary: true },
          { name: 'fleet_number', type: 'varchar', length: '32', isUnique: true },
          { name: 'operator_name', type: 'varchar', length: '120' },
          { name: 'operator_user_id', type: 'varchar', length: '36', isNullable: true },
          { name: 'location', type: 'varchar', length: '120' },
          { name: 'data', type: 'text' },
          { name: 'created_at', type: 'varchar', length: '30' },
        ],
        foreignKeys: [fk('operator_user_id', 'user', 'SET NULL')],
      }),
    );
    await queryRunner.createTable(
      new Table({
        name: 'component',
        columns: [
          { name: 'id', type: 'varchar', length: '36', isPrimary: true },
          { name: 'serial', type: 'varchar', length: '64', isUnique: true },
          { name: 'kind', type: 'varchar', length: '16' },
          { name: 'type_id', type: 'varchar', length: '64' },
          { name: 'model_id', type: 'varchar', length: '36' },
          { name: 'unit_id', type: 'varchar', length: '36', isNullable: true },
          { name: 'location', type: 'varchar', length: '120' },
          { name: 'status', type: 'varchar', length: '16' },
          { name: 'retired_reason', type: 'varchar', length: '500', isNullable: true },
          { name: 'created_at', type: 'varchar', length: '30' },
          { name: 'updated_at', type: 'varchar', length: '30' },
        ],
        indices: [new TableIndex({ columnNames: ['unit_id'] }), new TableIndex({ columnNames: ['status'] })],
        foreignKeys: [fk('model_id', 'crane_model'), fk('unit_id', 'crane_unit', 'SET NULL')],
      }),
    );
    await queryRunner.createTable(
      new Table({
        name: 'inspection',
        columns: [
          { name: 'id', type: 'varchar', length: '36', isPrimary: true },
          { name: 'component_id', type: 'varchar', length: '36' },
          { name: 'at', type: 'varchar', length: '30' },
          { name: 'by_user_id', type: 'varchar', length: '36' },
          { name: 'result', type: 'varchar', length: '16' },
          { name: 'notes', type: 'text' },
          { name: 'photo_ids', type: 'text' },
        ],
        indices: [new TableIndex({ columnNames: ['component_id', 'at'] })],
        foreignKeys: [fk('component_id', 'component'), fk('by_user_id', 'user')],
      }),
    );
  }

  async down(queryRunner: QueryRunner): Promise<void> {
    for (const table of ['inspection', 'component', 'assist_crane', 'crane_unit', 'crane_model', 'upload']) await queryRunner.dropTable(table);
  }
}
