import type { DataSource } from 'typeorm';
import type { PresenceEntry } from '../shared/board/types.js';
import type { JobEventDto } from '../shared/events/log.js';
import type { Config } from './config.js';
import type { Job } from './entities/Job.js';
import type { WriteQueue } from './db/write-queue.js';
import type { Logger } from './logger.js';
import type { LiveJobAccess } from './policies/index.js';
import type { Mailer } from './mail/mailer.js';
import type { MailOutboxService } from './mail/outbox.js';
import type { Storage } from './storage/index.js';

/**
 * What commands and routes may tell live connections. Made once in `createApp` (a
 * `BoardPublisher`, server/sockets/publisher.ts) before anything uses it; nothing replaces it later.
 */
export interface Publisher {
  /** Tells every socket of a person why their session ended, then disconnects them. */
  endSessions(userId: string, reason: string): void;
  /** Tells the sockets of one session (a sign-in: its refresh-token family) why it ended, then disconnects them. */
  endSession(sessionId: string, reason: string): void;
  /** The same for every session of a person but one (a password set from a link). */
  endSessionsExcept(userId: string, keepSessionId: string, reason: string): void;
  /** Broadcasts a committed job event to everyone on that job's board, and its list line to whoever follows the job. */
  publishJobEvent(event: JobEventDto, job: Pick<Job, 'id' | 'name' | 'site' | 'state' | 'timeZone' | 'planVersion' | 'lastSeq' | 'updatedAt'>): void;
  /** Who is connected to a job's board now. */
  presenceOf(jobId: string): PresenceEntry[];
  /** The jobs whose board or list line any open socket of this person receives now. */
  jobsReachedBy(userId: string): string[];
  /**
   * After a committed change to someone's crew roles or admin flag: their open sockets leave what
   * the policy no longer gives them from this job, and a socket taken off the board is told why.
   */
  limitJobAccess(jobId: string, userId: string, access: LiveJobAccess, reason: string): void;
}

/** What every router, socket handler and command receives: the app's collaborators. */
export interface AppContext {
  config: Config;
  dataSource: DataSource;
  queue: WriteQueue;
  logger: Logger;
  mailer: Mailer;
  /** Every e-mail sent for the record goes through it, after the commit (server/mail/outbox.ts). */
  outbox: MailOutboxService;
  /** Photo bytes, behind a small interface (local disk under the data folder by default). */
  storage: Storage;
  /** The token-signing secret (configured or generated in the data folder). */
  secret: string;
  /** The clock; tests move it to check expiries. */
  now(): Date;
  publisher: Publisher;
}
