import { TableColumn, type MigrationInterface, type QueryRunner } from 'typeorm';
import { serverTimeZone } from '../../config.js';

/**
 * Each job's site time zone (IANA name). Jobs that exist when this runs take the server's zone at
 * that moment (HOLDLINE_TIME_ZONE if set, else the process's zone): the zone their times were
 * read in until now. An admin or the job's supervisor can correct it on the job afterwards.
 */
export class JobTimeZone1764669600000 implements MigrationInterface {
  name = 'JobTimeZone1764669600000';

  async up(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.addColumn('job', new TableColumn({ name: 'time_zone', type: 'varchar', length: '64', default: "'UTC'" }));
    await queryRunner.query('UPDATE job SET time_zone = ?', [serverTimeZone()]);
  }

  async down(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.dropColumn('job', 'time_zone');
  }
}
