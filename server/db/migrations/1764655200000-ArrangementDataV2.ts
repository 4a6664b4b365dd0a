import type { MigrationInterface, QueryRunner } from 'typeorm';
import { upgradeArrangementData } from '../../../shared/schemas/arrangement.js';

/**
 * Arrangement data version 2: stored version-1 files gain the weights, boom-foot geometry, rope
 * runs and capacity charts as null or empty, so the planner shows them as "not included" rather
 * than reading them as zero. The same upgrade runs on every file imported later.
 */
export class ArrangementDataV21764655200000 implements MigrationInterface {
  name = 'ArrangementDataV21764655200000';

  async up(queryRunner: QueryRunner): Promise<void> {
    // Raw statements with the driver's own placeholders: portable, and free of the entity's JSON
    // transformer, which would encode the text a second time.
    const rows: { id: string; arrangement: string }[] = await queryRunner.query('SELECT id, arrangement FROM crane_model');
    const driver = queryRunner.connection.driver;
    for (const row of rows) {
      const upgraded = JSON.stringify(upgradeArrangementData(JSON.parse(row.arrangement)));
      const [sql, parameters] = driver.escapeQueryWithParameters('UPDATE crane_model SET arrangement = :arrangement WHERE id = :id', { arrangement: upgraded, id: row.id });
      await queryRunner.query(sql, parameters);
    }
  }

  async down(): Promise<void> {
    // Version 2 only adds values; a version-1 reader would refuse them, and dropping them would lose data.
    throw new Error('Arrangement data version 2 cannot be taken back to version 1.');
  }
}
