import 'reflect-metadata';
import { createApp } from './app.js';
import { ConfigError, loadConfig } from './config.js';
import { openDatabase } from './db/data-source.js';
import { DEMO_PASSWORD, demoPeople } from './demo/people.js';
import { seedDemoIfEmpty } from './demo/seed.js';
import { createLogger } from './logger.js';

/** How long a graceful shutdown may take before the process exits anyway. */
const SHUTDOWN_LIMIT_MS = 20_000;

/** Boots Holdline: configuration, database and migrations, demo seed, then listen. */
async function main(): Promise<void> {
  let config;
  try {
    config = loadConfig();
  } catch (error) {
    if (error instanceof ConfigError) {
      console.error(error.message);
      process.exit(2);
    }
    throw error;
  }
  const logger = createLogger(config.logLevel);
  const dataSource = await openDatabase(config.databasePath);
  const holdline = createApp({ config, dataSource, logger, clientDir: config.clientDir });

  if (config.demo && (await seedDemoIfEmpty(holdline.context))) logger.info('demo scenario seeded');

  await new Promise<void>((resolve, reject) => {
    holdline.httpServer.once('error', reject);
    holdline.httpServer.listen(config.port, resolve);
  });
  printBanner(config.publicUrl, config.port, config.demo);

  // SIGTERM (a service manager's stop or restart) and SIGINT: no new commands (`server_restarting`),
  // the queued ones commit and are answered, every board is told the server is restarting, then
  // exit 0. Boards reconnect and catch up by themselves once the server is back.
  let stopping = false;
  const shutdown = (signal: string) => {
    if (stopping) return;
    stopping = true;
    logger.info({ signal }, 'shutting down');
    // A shutdown that hangs would keep the port and the crew waiting: give up after a bound.
    // Everything committed is already on disk (WAL, synchronous FULL), so exiting loses nothing acknowledged.
    setTimeout(() => {
      logger.error({ signal }, 'shutdown took too long; exiting');
      process.exit(1);
    }, SHUTDOWN_LIMIT_MS).unref();
    holdline.close().then(
      () => process.exit(0),
      (error: unknown) => {
        logger.error({ err: error }, 'shutdown failed');
        process.exit(1);
      },
    );
  };
  process.on('SIGTERM', () => shutdown('SIGTERM'));
  process.on('SIGINT', () => shutdown('SIGINT'));
}

function printBanner(publicUrl: string, port: number, demo: boolean): void {
  const lines = [``, `Holdline is serving on http://localhost:${port}  (public URL ${publicUrl})`];
  if (demo) {
    lines.push(`Demo sign-ins, all with the password "${DEMO_PASSWORD}":`);
    for (const p of demoPeople) lines.push(`  ${p.email.padEnd(28)} ${p.displayName} (${p.note})`);
  }
  lines.push('');
  console.log(lines.join('\n'));
}

main().catch((error: unknown) => {
  console.error('Holdline failed to start:', error instanceof Error ? error.message : error);
  process.exit(1);
});
