import { randomUUID } from 'node:crypto';
import { In, LessThanOrEqual } from 'typeorm';
import type { DataSource } from 'typeorm';
import type { JobEventDto } from '../../shared/events/log.js';
import type { MailProblem } from '../../shared/schemas/mail.js';
import type { Config } from '../config.js';
import type { WriteQueue } from '../db/write-queue.js';
import { MailOutbox, type OutboxAttachment, type OutboxHoldWait } from '../entities/MailOutbox.js';
import { Job } from '../entities/Job.js';
import { JobEvent } from '../entities/JobEvent.js';
import type { Logger } from '../logger.js';
import { completesJob, completingSeq, completionMail, stateSetTo } from './completion.js';
import { mayAnchorShift, shiftAnchorMails } from './shift-anchor.js';
import { holdStillWaiting } from './hold-wait.js';
import type { MailAttachment, Mailer } from './mailer.js';
import { noRecordPdf, type RecordPdfSource } from './record-pdf.js';

/** One e-mail to queue. */
export interface QueuedMail {
  /** Unique per e-mail meant: queueing the same key again keeps the first (restarts, the next timer tick). */
  dedupeKey: string;
  kind: MailOutbox['kind'];
  jobId: string | null;
  to: string;
  subject: string;
  body: string;
  attachments?: OutboxAttachment[];
  holdWait?: OutboxHoldWait | null;
}

/**
 * The wait before each try: the first at once, then after 30 s, 2 min and 5 min: four tries over
 * seven and a half minutes, enough to ride out a mail server restarting without hammering it.
 */
export const DEFAULT_RETRY_DELAYS_MS: readonly number[] = [0, 30_000, 120_000, 300_000];

/** The longest the outbox sleeps between looks, so a due e-mail is never forgotten by a lost timer. */
const MAX_SLEEP_MS = 60_000;
const BATCH = 20;

export interface OutboxDeps {
  config: Config;
  dataSource: DataSource;
  queue: WriteQueue;
  logger: Logger;
  mailer: Mailer;
  now(): Date;
}

export interface OutboxOptions {
  /** Waits before each try (the first is usually 0); tests pass short ones. */
  retryDelaysMs?: readonly number[];
  /** Where the record PDF comes from (server/mail/record-pdf.ts). */
  recordPdf?: RecordPdfSource;
}

/**
 * Every e-mail Holdline sends for the record goes through here: queued in the `mail_outbox`
 * table after the command that caused it has committed, sent by this loop outside every
 * transaction, retried with backoff, and kept when it fails so the admin sees it. Nothing here
 * can hold up or fail a board command: the command has already answered when the e-mail is
 * queued, and every error is caught and logged.
 *
 * Sign-in e-mails (invitations, resets) keep their direct send: the admin who invites someone
 * sees at once whether it went, and resends from the people screen.
 */
export class MailOutboxService {
  private readonly retryDelaysMs: readonly number[];
  private readonly recordPdf: RecordPdfSource;
  private timer: NodeJS.Timeout | null = null;
  private running: Promise<void> | null = null;
  private again = false;
  private stopped = false;
  private started = false;
  private starting: Promise<void> | null = null;

  constructor(
    private readonly deps: OutboxDeps,
    options: OutboxOptions = {},
  ) {
    this.retryDelaysMs = options.retryDelaysMs?.length ? options.retryDelaysMs : DEFAULT_RETRY_DELAYS_MS;
    this.recordPdf = options.recordPdf ?? noRecordPdf;
  }

  /** Starts sending; queues the completion and shift-end e-mails of any job completed or made safe while the server was down. */
  start(): void {
    if (this.started || this.stopped) return;
    this.started = true;
    this.starting = Promise.all([this.queueMissedCompletions(), this.queueMissedShiftAnchors()]).then(
      () => this.kick(),
      (error: unknown) => this.deps.logger.error({ err: error }, 'could not look for completion or shift-end e-mails to send'),
    );
  }

  /** Stops the loop and waits for a send in progress to be recorded. */
  async stop(): Promise<void> {
    this.stopped = true;
    if (this.timer) clearTimeout(this.timer);
    this.timer = null;
    await this.starting;
    await this.running;
  }

  /**
   * Called by the job writer after an event has committed. Never throws and never waits: the
   * command's answer does not depend on e-mail.
   */
  jobEventCommitted(event: JobEventDto): void {
    if (this.stopped) return;
    if (completesJob(event)) {
      this.queueCompletion(event.jobId, event.seq).then(
        () => this.kick(),
        (error: unknown) => this.deps.logger.error({ err: error, jobId: event.jobId }, 'could not queue the completion e-mail'),
      );
    }
    if (mayAnchorShift(event)) {
      this.queueShiftAnchor(event.jobId, event.seq).then(
        () => this.kick(),
        (error: unknown) => this.deps.logger.error({ err: error, jobId: event.jobId, seq: event.seq }, 'could not queue the shift-end e-mail'),
      );
    }
  }

  /** Queues e-mails; one whose key is already queued (or sent) is left alone. Returns how many were new. */
  async enqueue(mails: readonly QueuedMail[]): Promise<number> {
    if (mails.length === 0) return 0;
    const now = this.deps.now().toISOString();
    const added = await this.deps.queue.transaction(async (manager) => {
      const existing = new Set((await manager.find(MailOutbox, { where: { dedupeKey: In(mails.map((m) => m.dedupeKey)) }, select: { dedupeKey: true } })).map((r) => r.dedupeKey));
      const fresh = [...new Map(mails.filter((m) => !existing.has(m.dedupeKey)).map((m) => [m.dedupeKey, m])).values()];
      if (fresh.length === 0) return 0;
      const first = new Date(Date.parse(now) + this.retryDelaysMs[0]!).toISOString();
      await manager.insert(
        MailOutbox,
        fresh.map((m) => ({
          id: randomUUID(),
          dedupeKey: m.dedupeKey,
          kind: m.kind,
          jobId: m.jobId,
          to: m.to,
          subject: m.subject,
          body: m.body,
          attachments: m.attachments ?? [],
          holdWait: m.holdWait ?? null,
          state: 'pending' as const,
          attempts: 0,
          nextAttemptAt: first,
          lastAttemptAt: null,
          lastError: null,
          createdAt: now,
          sentAt: null,
        })),
      );
      return fresh.length;
    });
    if (added) this.kick();
    return added;
  }

  /** E-mails that failed for good, or are waiting to be tried again after a failure; newest first. */
  async problems(limit = 200): Promise<MailProblem[]> {
    const rows = await this.deps.dataSource.manager
      .createQueryBuilder(MailOutbox, 'm')
      .where("m.state = 'failed' OR (m.state = 'pending' AND m.attempts > 0)")
      .orderBy('m.created_at', 'DESC')
      .limit(limit)
      .getMany();
    return rows.map((r) => ({
      id: r.id,
      kind: r.kind,
      state: r.state,
      to: r.to,
      subject: r.subject,
      jobId: r.jobId,
      attempts: r.attempts,
      lastError: r.lastError,
      createdAt: r.createdAt,
      lastAttemptAt: r.lastAttemptAt,
      nextAttemptAt: r.state === 'pending' ? r.nextAttemptAt : null,
    }));
  }

  /** Looks for due e-mails now (after queueing, and from the timer). */
  kick(): void {
    if (this.stopped || !this.started) return;
    if (this.running) {
      this.again = true;
      return;
    }
    this.running = this.loop()
      .catch((error: unknown) => this.deps.logger.error({ err: error }, 'the e-mail outbox stopped a round early'))
      .finally(() => {
        this.running = null;
        void this.scheduleNext();
      });
  }

  /** Resolves when nothing is being sent right now (tests). */
  async idle(): Promise<void> {
    while (this.running) await this.running;
  }

  private async loop(): Promise<void> {
    do {
      this.again = false;
      const now = this.deps.now().toISOString();
      const due = await this.deps.dataSource.manager.find(MailOutbox, {
        where: { state: 'pending', nextAttemptAt: LessThanOrEqual(now) },
        order: { nextAttemptAt: 'ASC', createdAt: 'ASC' },
        take: BATCH,
      });
      for (const row of due) {
        if (this.stopped) return;
        await this.attempt(row);
      }
      if (due.length === BATCH) this.again = true;
    } while (this.again && !this.stopped);
  }

  private async scheduleNext(): Promise<void> {
    if (this.stopped) return;
    const next = await this.deps.dataSource.manager.findOne(MailOutbox, { where: { state: 'pending' }, order: { nextAttemptAt: 'ASC' }, select: { id: true, nextAttemptAt: true } });
    if (this.stopped || this.running) return;
    if (this.timer) clearTimeout(this.timer);
    const wait = next?.nextAttemptAt ? Date.parse(next.nextAttemptAt) - this.deps.now().getTime() : MAX_SLEEP_MS;
    this.timer = setTimeout(() => {
      this.timer = null;
      this.kick();
    }, Math.min(Math.max(wait, 0), MAX_SLEEP_MS));
    this.timer.unref();
  }

  private async attempt(row: MailOutbox): Promise<void> {
    const { logger, mailer } = this.deps;
    const holdWait = row.holdWait;
    if (holdWait && !(await this.deps.queue.run(() => holdStillWaiting(this.deps.dataSource.manager, holdWait)))) {
      await this.update(row.id, { state: 'cancelled', nextAttemptAt: null, lastError: 'The hold moved on before this reminder went out.' });
      return;
    }
    const attemptAt = this.deps.now().toISOString();
    try {
      const { attachments, note } = await this.attachmentsOf(row);
      await mailer.send({ to: row.to, subject: row.subject, text: note ? `${row.body}\n\n${note}` : row.body, attachments });
      await this.update(row.id, { state: 'sent', attempts: row.attempts + 1, lastAttemptAt: attemptAt, sentAt: this.deps.now().toISOString(), nextAttemptAt: null });
    } catch (error) {
      const attempts = row.attempts + 1;
      const delay = this.retryDelaysMs[attempts];
      const message = error instanceof Error ? error.message : String(error);
      const nextAttemptAt = delay === undefined ? null : new Date(this.deps.now().getTime() + delay).toISOString();
      await this.update(row.id, { state: delay === undefined ? 'failed' : 'pending', attempts, lastAttemptAt: attemptAt, lastError: message.slice(0, 1000), nextAttemptAt });
      const detail = { id: row.id, kind: row.kind, to: row.to, attempts, err: message };
      if (delay === undefined) logger.error(detail, 'e-mail given up after its last try; listed for the admin');
      else logger.warn({ ...detail, retryInMs: delay }, 'e-mail not sent; will try again');
    }
  }

  private async attachmentsOf(row: MailOutbox): Promise<{ attachments: MailAttachment[]; note: string | null }> {
    const attachments: MailAttachment[] = [];
    const notes: string[] = [];
    for (const spec of row.attachments) {
      const pdf = await this.recordPdf(spec.jobId);
      if (pdf) attachments.push(pdf);
      else notes.push(`The record PDF is not attached to this e-mail: download it from the job in Holdline, ${this.deps.config.publicUrl}/jobs/${spec.jobId}`);
    }
    if (attachments.length) notes.unshift('The record PDF is attached.');
    return { attachments, note: notes.length ? notes.join('\n') : null };
  }

  private async update(id: string, changes: Partial<Pick<MailOutbox, 'state' | 'attempts' | 'lastAttemptAt' | 'lastError' | 'nextAttemptAt' | 'sentAt'>>): Promise<void> {
    await this.deps.queue.transaction((manager) => manager.update(MailOutbox, { id }, changes).then(() => undefined));
  }

  private async queueCompletion(jobId: string, seq: number): Promise<void> {
    const mails = await this.deps.queue.run(() => completionMail(this.deps.dataSource.manager, this.deps.config.publicUrl, jobId, seq));
    await this.enqueue(mails);
  }

  private async queueShiftAnchor(jobId: string, seq: number): Promise<void> {
    const mails = await this.deps.queue.run(() => shiftAnchorMails(this.deps.dataSource.manager, this.deps.config.publicUrl, jobId, seq));
    await this.enqueue(mails);
  }

  /**
   * A job made safe (or a handover note written while it is) just before a crash or shutdown still
   * gets its shift-end e-mails: the events since the job was last made safe are looked at again,
   * and the keys make this safe to repeat.
   */
  private async queueMissedShiftAnchors(): Promise<void> {
    const { manager } = this.deps.dataSource;
    const madeSafe = await manager.find(Job, { where: { state: 'made_safe' }, select: { id: true } });
    for (const job of madeSafe) {
      if (this.stopped) return;
      const recent = await manager.find(JobEvent, { where: { jobId: job.id }, order: { seq: 'DESC' }, take: 200, select: { seq: true, type: true, data: true } });
      const since = recent.findIndex((r) => stateSetTo(r.data) === 'made_safe');
      if (since < 0) continue;
      for (const row of recent.slice(0, since + 1).reverse()) {
        if (row.seq === recent[since]!.seq || row.type === 'handover.written') await this.queueShiftAnchor(job.id, row.seq);
      }
    }
  }

  /** A completion committed just before a crash or shutdown still gets its e-mails: the keys make this safe to repeat. */
  private async queueMissedCompletions(): Promise<void> {
    const { manager } = this.deps.dataSource;
    const complete = await manager.find(Job, { where: { state: 'complete' }, select: { id: true } });
    if (complete.length === 0) return;
    const queued = new Set((await manager.find(MailOutbox, { where: { kind: 'completion' }, select: { jobId: true } })).map((r) => r.jobId));
    for (const job of complete) {
      if (queued.has(job.id) || this.stopped) continue;
      const seq = await completingSeq(manager, job.id);
      if (seq !== null) await this.enqueue(await completionMail(manager, this.deps.config.publicUrl, job.id, seq));
    }
  }
}
