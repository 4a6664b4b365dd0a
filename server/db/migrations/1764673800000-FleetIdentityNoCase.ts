import type { MigrationInterface, QueryRunner } from 'typeorm';

/** How the fleet commands compare identities (server/commands/fleet.ts `identityKey`), frozen here. */
const keyOf = (value: string) => value.normalize('NFKC').toUpperCase();

const indexes = [
  { name: 'IDX_crane_unit_fleet_number_nocase', table: 'crane_unit', column: 'fleet_number', what: 'crane units with fleet numbers' },
  { name: 'IDX_assist_crane_fleet_number_nocase', table: 'assist_crane', column: 'fleet_number', what: 'assist cranes with fleet numbers' },
  { name: 'IDX_component_serial_nocase', table: 'component', column: 'serial', what: 'components with serial numbers' },
] as const;

/**
 * Fleet numbers and component serials are one identity whatever their letter case: `fl-07` is
 * `FL-07`. Unique indexes with COLLATE NOCASE (ASCII letters) back up the commands' check, which
 * also folds other scripts. A database that already holds two rows differing only by case stops
 * here with the rows named: which one is the real crane or part is for a person to decide, never a
 * guess.
 */
export class FleetIdentityNoCase1764673800000 implements MigrationInterface {
  name = 'FleetIdentityNoCase1764673800000';

  async up(queryRunner: QueryRunner): Promise<void> {
    const clashes: string[] = [];
    for (const index of indexes) {
      const rows = (await queryRunner.query(`SELECT "${index.column}" AS value FROM "${index.table}"`)) as { value: string }[];
      const byKey = new Map<string, string[]>();
      for (const { value } of rows) byKey.set(keyOf(value), [...(byKey.get(keyOf(value)) ?? []), value]);
      for (const values of byKey.values()) if (values.length > 1) clashes.push(`${index.what} ${values.map((v) => JSON.stringify(v)).join(' and ')}`);
    }
    if (clashes.length) {
      throw new Error(
        `Holdline cannot start: these differ only by letter case but must name one crane or part each: ${clashes.join('; ')}. Take a backup, rename all but one of each (for example with the sqlite3 shell), then start again.`,
      );
    }
    for (const index of indexes) {
      await queryRunner.query(`CREATE UNIQUE INDEX "${index.name}" ON "${index.table}" ("${index.column}" COLLATE NOCASE)`);
    }
  }

  async down(queryRunner: QueryRunner): Promise<void> {
    for (const index of indexes) await queryRunner.query(`DROP INDEX "${index.name}"`);
  }
}
