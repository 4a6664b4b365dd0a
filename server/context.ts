import type { DataSource } from 'typeorm';
import type { Config } from './config.js';
import type { WriteQueue } from './db/write-queue.js';
import type { Logger } from './logger.js';

/** What every router, socket handler and command receives: the app's collaborators. */
export interface AppContext {
  config: Config;
  dataSource: DataSource;
  queue: WriteQueue;
  logger: Logger;
}
