import { mkdtempSync, rmSync } from 'node:fs';
import type { AddressInfo } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { createApp, type HoldlineApp } from '../../server/app.js';
import { loadConfig, type Config } from '../../server/config.js';
import { openDatabase } from '../../server/db/data-source.js';
import { createLogger } from '../../server/logger.js';
import type { OutboxOptions } from '../../server/mail/outbox.js';
import type { DestinationStream } from 'pino';

export interface TestServer extends HoldlineApp {
  url: string;
  /** Moves the server's clock forward (expiries, grace periods). */
  advance(ms: number): void;
  port: number;
  config: Config;
  dataDir: string;
  /** Closes the app and removes its data folder (`close()` keeps the folder, for a restart on the same data). */
  stop(): Promise<void>;
}

export interface TestServerOptions {
  /** Serve the built client from dist/, or from HOLDLINE_TEST_CLIENT_DIR when set (browser tests). */
  withClient?: boolean;
  env?: Record<string, string>;
  /** Short retry waits for the e-mail outbox, or a record PDF source. */
  outbox?: OutboxOptions;
  /** Start on the data folder of an earlier server (after its `close()`), as a restart does. */
  dataDir?: string;
  /** Where the app's logs go (with `env: { LOG_LEVEL }`), for a test that reads them. */
  logStream?: DestinationStream;
}

/** Boots the real app on an ephemeral port with its own SQLite file in a temporary folder. */
export async function startTestServer(options: TestServerOptions = {}): Promise<TestServer> {
  const dataDir = options.dataDir ?? mkdtempSync(path.join(os.tmpdir(), 'holdline-test-'));
  const config = loadConfig({
    HOLDLINE_DB: path.join(dataDir, 'holdline.sqlite'),
    HOLDLINE_DEMO: '0',
    LOG_LEVEL: 'silent',
    HOLDLINE_SECRET: 'test-secret-test-secret-test-secret-0123456789',
    ...options.env,
  });
  const dataSource = await openDatabase(config.databasePath);
  let offsetMs = 0;
  const holdline = createApp({
    now: () => new Date(Date.now() + offsetMs),
    outbox: options.outbox,
    config,
    dataSource,
    logger: createLogger(config.logLevel, options.logStream),
    clientDir: options.withClient ? path.resolve(import.meta.dirname, '..', '..', process.env.HOLDLINE_TEST_CLIENT_DIR ?? 'dist') : undefined,
  });
  await new Promise<void>((resolve) => holdline.httpServer.listen(0, '127.0.0.1', resolve));
  const port = (holdline.httpServer.address() as AddressInfo).port;
  const url = `http://127.0.0.1:${port}`;
  config.publicUrl = url;
  return {
    ...holdline,
    url,
    port,
    advance(ms: number) {
      offsetMs += ms;
    },
    config,
    dataDir,
    async stop() {
      await holdline.close();
      rmSync(dataDir, { recursive: true, force: true });
    },
  };
}
