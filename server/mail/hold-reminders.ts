import { In } from 'typeorm';
import { committedJobs } from '../db/committed-jobs.js';
import { roleLabel } from '../../shared/schemas/users.js';
import type { CrewRole } from '../../shared/schemas/jobs.js';
import type { AppContext } from '../context.js';
import { Job } from '../entities/Job.js';
import { User } from '../entities/User.js';
import { holdWaitStart, rolesStillNeeded } from './hold-wait.js';
import type { MailOutboxService, QueuedMail } from './outbox.js';
import { holdReminderMail } from './templates.js';

/** How often the server looks for holds waiting on someone who is not on the board. */
export const HOLD_REMINDER_CHECK_MS = 60_000;

type ReminderContext = Pick<AppContext, 'config' | 'dataSource' | 'queue' | 'logger' | 'now' | 'publisher'>;

/**
 * E-mails a crew member once when a hold of a live job has waited longer than the job's
 * `holdReminderMinutes` for a role of theirs and nobody holding that role is connected to the
 * board. A role with someone on the board is left alone: that person can answer. Each reminder is
 * queued in the outbox under a key naming the job, the hold, the event that began this wait and
 * the person, so the next minute's look, or a restart, finds it already there and sends nothing
 * more; and the outbox drops it if the hold has moved on before it goes.
 */
export class HoldReminders {
  private timer: NodeJS.Timeout | null = null;
  private checking: Promise<number> | null = null;

  constructor(
    private readonly context: ReminderContext,
    private readonly outbox: MailOutboxService,
  ) {}

  start(intervalMs = HOLD_REMINDER_CHECK_MS): void {
    if (this.timer) return;
    this.timer = setInterval(() => {
      void this.check().catch((error: unknown) => this.context.logger.error({ err: error }, 'hold reminder check failed'));
    }, intervalMs);
    this.timer.unref();
  }

  async stop(): Promise<void> {
    if (this.timer) clearInterval(this.timer);
    this.timer = null;
    await this.checking?.catch(() => undefined);
  }

  /** One look at every live job; returns how many new reminders were queued. Overlapping calls share one look. */
  check(): Promise<number> {
    this.checking ??= this.look().finally(() => {
      this.checking = null;
    });
    return this.checking;
  }

  private async look(): Promise<number> {
    const { manager } = this.context.dataSource;
    const now = this.context.now().getTime();
    const jobs = await manager.find(Job, { where: { state: 'live' } });
    // Boards are read under the queue, as every read of a job's state is: never a write's uncommitted rows.
    const boards = await this.context.queue.run(async () => new Map(jobs.map((job) => [job.id, committedJobs(this.context.dataSource).read(job.id)?.board])));
    const mails: QueuedMail[] = [];
    for (const job of jobs) {
      const board = boards.get(job.id);
      if (!board) continue;
      const connected = new Set(this.context.publisher.presenceOf(job.id).map((p) => p.userId));
      for (const stage of board.stages) {
        const hold = stage.hold;
        if (stage.state !== 'holding' || hold?.state !== 'open') continue;
        const needed = rolesStillNeeded(hold);
        if (needed.length === 0) continue;
        const wait = await holdWaitStart(manager, job.id, hold.id);
        if (!wait) continue;
        const waitedMs = now - Date.parse(wait.at);
        if (waitedMs < job.holdReminderMinutes * 60_000) continue;

        const absent = new Map<string, CrewRole[]>();
        for (const role of needed) {
          const members = board.crew.filter((m) => m.role === role);
          if (members.some((m) => connected.has(m.userId))) continue;
          for (const m of members) absent.set(m.userId, [...(absent.get(m.userId) ?? []), role]);
        }
        if (absent.size === 0) continue;
        const people = await manager.findBy(User, { id: In([...absent.keys()]), active: true });
        for (const person of people) {
          const roles = absent.get(person.id) ?? [];
          const mail = holdReminderMail(
            person.email,
            { displayName: person.displayName, roles: roles.map((r) => roleLabel(r).toLowerCase()) },
            { title: hold.title, waitedMinutes: Math.floor(waitedMs / 60_000), openSince: wait.at },
            { name: job.name, site: job.site, craneFleetNumber: board.job.craneFleetNumber, timeZone: job.timeZone },
            `${this.context.config.publicUrl}/jobs/${job.id}/open`,
          );
          mails.push({
            dedupeKey: `hold-reminder:${job.id}:${hold.id}:${wait.seq}:${person.id}`,
            kind: 'hold_reminder',
            jobId: job.id,
            to: mail.to,
            subject: mail.subject,
            body: mail.text,
            holdWait: { jobId: job.id, holdId: hold.id, openedSeq: wait.seq, roles },
          });
        }
      }
    }
    return this.outbox.enqueue(mails);
  }
}
