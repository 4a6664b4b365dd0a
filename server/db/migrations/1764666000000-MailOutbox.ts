import { Table, TableColumn, TableIndex, type MigrationInterface, type QueryRunner } from 'typeorm';

/** The outbox of e-mails sent for the record, and each job's hold reminder time. */
export class MailOutbox1764666000000 implements MigrationInterface {
  name = 'MailOutbox1764666000000';

  async up(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.createTable(
      new Table({
        name: 'mail_outbox',
        columns: [
          { name: 'id', type: 'varchar', length: '36', isPrimary: true },
          { name: 'dedupe_key', type: 'varchar', length: '200', isUnique: true },
          { name: 'kind', type: 'varchar', length: '24' },
          { name: 'job_id', type: 'varchar', length: '36', isNullable: true },
          { name: 'to_address', type: 'varchar', length: '254' },
          { name: 'subject', type: 'varchar', length: '300' },
          { name: 'body', type: 'text' },
          { name: 'attachments', type: 'text' },
          { name: 'hold_wait', type: 'text', isNullable: true },
          { name: 'state', type: 'varchar', length: '12' },
          { name: 'attempts', type: 'integer' },
          { name: 'next_attempt_at', type: 'varchar', length: '30', isNullable: true },
          { name: 'last_attempt_at', type: 'varchar', length: '30', isNullable: true },
          { name: 'last_error', type: 'text', isNullable: true },
          { name: 'created_at', type: 'varchar', length: '30' },
          { name: 'sent_at', type: 'varchar', length: '30', isNullable: true },
        ],
        indices: [new TableIndex({ columnNames: ['state', 'next_attempt_at'] })],
      }),
    );
    // Ten minutes unless the supervisor sets otherwise; existing jobs take the default.
    await queryRunner.addColumn('job', new TableColumn({ name: 'hold_reminder_minutes', type: 'integer', default: 10 }));
  }

  async down(queryRunner: QueryRunner): Promise<void> {
    await queryRunner.dropColumn('job', 'hold_reminder_minutes');
    await queryRunner.dropTable('mail_outbox');
  }
}
