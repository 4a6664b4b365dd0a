import { Column, Entity, PrimaryColumn } from 'typeorm';
import type { CrewRole } from '../../shared/schemas/jobs.js';
import type { OutboxKind, OutboxState } from '../../shared/schemas/mail.js';

/** What a queued e-mail carries besides its text, made when its turn comes. */
export interface OutboxAttachment {
  /** The job's record PDF, rendered at send time. */
  kind: 'record-pdf';
  jobId: string;
}

/** The hold wait a reminder is about: it is cancelled when the hold has moved on. */
export interface OutboxHoldWait {
  jobId: string;
  holdId: string;
  /** The event that opened this wait of the hold (see server/mail/hold-wait.ts). */
  openedSeq: number;
  /** The roles the reminder was sent for: once all of them have acknowledged, it is not wanted. */
  roles: CrewRole[];
}

/**
 * One e-mail sent for the record (completion, hold reminders), kept until it is sent or has
 * given up, so a failure is never silent and a restart neither loses nor repeats one. `dedupeKey`
 * is unique: queueing the same e-mail twice (a restart, the reminder timer's next minute) keeps
 * the first.
 */
@Entity('mail_outbox')
export class MailOutbox {
  @PrimaryColumn('varchar', { length: 36 })
  id!: string;

  @Column('varchar', { length: 200, name: 'dedupe_key', unique: true })
  dedupeKey!: string;

  @Column('varchar', { length: 24 })
  kind!: OutboxKind;

  @Column('varchar', { length: 36, name: 'job_id', nullable: true })
  jobId!: string | null;

  @Column('varchar', { length: 254, name: 'to_address' })
  to!: string;

  @Column('varchar', { length: 300 })
  subject!: string;

  @Column('text')
  body!: string;

  @Column('simple-json')
  attachments!: OutboxAttachment[];

  @Column('simple-json', { name: 'hold_wait', nullable: true })
  holdWait!: OutboxHoldWait | null;

  @Column('varchar', { length: 12 })
  state!: OutboxState;

  @Column('integer')
  attempts!: number;

  @Column('varchar', { length: 30, name: 'next_attempt_at', nullable: true })
  nextAttemptAt!: string | null;

  @Column('varchar', { length: 30, name: 'last_attempt_at', nullable: true })
  lastAttemptAt!: string | null;

  @Column('text', { name: 'last_error', nullable: true })
  lastError!: string | null;

  @Column('varchar', { length: 30, name: 'created_at' })
  createdAt!: string;

  @Column('varchar', { length: 30, name: 'sent_at', nullable: true })
  sentAt!: string | null;
}
