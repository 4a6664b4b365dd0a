import type { DataSource } from 'typeorm';
import type { PresenceEntry } from '../shared/board/types.js';
import type { JobEventDto } from '../shared/events/log.js';
import type { Config } from './config.js';
import type { Job } from './entities/Job.js';
import type { WriteQueue } from './db/write-queue.js';
import type { Logger } from './logger.js';
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
  /** Broadcasts a committed job event to everyone on that job's board, and its list line to whoever follows the job. */
  publishJobEvent(event: JobEventDto, job: Pick<Job, 'id' | 'name' | 'site' | 'state' | 'timeZone' | 'planVersion' | 'lastSeq' | 'updatedAt'>): void;
  /** Who is connected to a job's board now. */
  presenceOf(jobId: string): PresenceEntry[];
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
