import { readFileSync } from 'node:fs';
import path from 'node:path';
import { z } from 'zod';
import { COMMAND_RATE, type CommandRateSetting } from './middlewares/input-guard.js';
import { isTimeZone, tidyTimeZone } from '../shared/time.js';

/** The server's settings, read from the environment once at start. */
export const configSchema = z.object({
  PORT: z.coerce.number().int().min(0).max(65535).default(3000),
  HOLDLINE_DB: z.string().min(1).default('data/holdline.sqlite'),
  HOLDLINE_PUBLIC_URL: z.url().optional(),
  HOLDLINE_DEMO: z.enum(['0', '1']).default('1'),
  /** The admin's test inbox (what the local fake mail server caught): off unless asked for (npm start and npm run dev ask). */
  HOLDLINE_TEST_INBOX: z.enum(['0', '1']).optional(),
  HOLDLINE_SECRET: z.string().min(32, 'must be at least 32 characters').optional(),
  SMTP_URL: z.url().refine((u) => /^smtps?:/.test(u), 'must start with smtp:// or smtps://').optional(),
  LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
  /** The zone a new job takes unless its site's is chosen, and the zone of times that belong to no job. */
  HOLDLINE_TIME_ZONE: z
    .string()
    .refine(isTimeZone, 'must be an IANA time zone name this runtime knows, e.g. Europe/Warsaw or UTC')
    .transform(tidyTimeZone)
    .optional(),
  /**
   * Messages a second one socket (and one person over HTTP) may send, after a burst of twice as
   * many. Only the benchmark raises it, to measure the command path rather than the limit.
   */
  HOLDLINE_COMMAND_RATE: z.coerce.number().int().min(1).max(1_000_000).optional(),
  /**
   * The built client the server sends to browsers: dist/ beside the project unless set (a path
   * relative to the working folder). The benchmark points it at a client it built elsewhere.
   */
  HOLDLINE_CLIENT_DIR: z.string().min(1).optional(),
});

export interface Config {
  port: number;
  databasePath: string;
  /** Folder beside the database: uploads, the generated secret, the fake inbox. */
  dataDir: string;
  publicUrl: string;
  demo: boolean;
  /** Whether GET /api/dev/inbox shows the local fake mail server's messages to admins (demo and development only). */
  testInbox: boolean;
  secret?: string;
  smtpUrl?: string;
  logLevel: string;
  /** The server's IANA time zone: the default for a new job's site (HOLDLINE_TIME_ZONE, else the process's). */
  timeZone: string;
  /** Board messages a second per socket and per person (server/middlewares/input-guard.ts). */
  commandRate: CommandRateSetting;
  /** Folder of the built client (HOLDLINE_CLIENT_DIR, else dist/ beside the project). */
  clientDir: string;
  version: string;
}

/** Thrown when a setting is invalid; the message names each bad variable. */
export class ConfigError extends Error {}

/** The command-line flag `npm start` and `npm run dev` pass to open the test inbox; HOLDLINE_TEST_INBOX, when set, wins. */
export const TEST_INBOX_FLAG = '--test-inbox';

/** Parses the environment; an empty string counts as unset so `VAR= npm start` means the default. */
export function loadConfig(env: NodeJS.ProcessEnv = process.env, argv: readonly string[] = process.argv): Config {
  const cleaned = Object.fromEntries(Object.entries(env).filter(([, v]) => v !== undefined && v !== ''));
  const parsed = configSchema.safeParse(cleaned);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`);
    throw new ConfigError(`Invalid configuration:\n${lines.join('\n')}`);
  }
  const c = parsed.data;
  const databasePath = path.resolve(c.HOLDLINE_DB);
  return {
    port: c.PORT,
    databasePath,
    dataDir: path.dirname(databasePath),
    publicUrl: (c.HOLDLINE_PUBLIC_URL ?? `http://localhost:${c.PORT}`).replace(/\/$/, ''),
    demo: c.HOLDLINE_DEMO === '1',
    testInbox: c.HOLDLINE_TEST_INBOX !== undefined ? c.HOLDLINE_TEST_INBOX === '1' : argv.includes(TEST_INBOX_FLAG),
    secret: c.HOLDLINE_SECRET,
    smtpUrl: c.SMTP_URL,
    logLevel: c.LOG_LEVEL,
    timeZone: c.HOLDLINE_TIME_ZONE ?? processTimeZone(),
    commandRate: c.HOLDLINE_COMMAND_RATE ? { perSecond: c.HOLDLINE_COMMAND_RATE, burst: 2 * c.HOLDLINE_COMMAND_RATE } : COMMAND_RATE,
    clientDir: c.HOLDLINE_CLIENT_DIR ? path.resolve(c.HOLDLINE_CLIENT_DIR) : path.resolve(import.meta.dirname, '..', 'dist'),
    version: packageVersion(),
  };
}

/** The version in package.json, shown by the health check. */
export function packageVersion(): string {
  const file = path.resolve(import.meta.dirname, '..', 'package.json');
  return (JSON.parse(readFileSync(file, 'utf8')) as { version: string }).version;
}

/**
 * The server's zone as the environment sets it, for code that runs before the configuration is
 * loaded (the migration that gives existing jobs a zone): a valid HOLDLINE_TIME_ZONE, else the process's.
 */
export function serverTimeZone(env: NodeJS.ProcessEnv = process.env): string {
  const set = env.HOLDLINE_TIME_ZONE?.trim();
  return set && isTimeZone(set) ? tidyTimeZone(set) : processTimeZone();
}

/** The zone the process runs in; UTC when the runtime cannot say. */
export function processTimeZone(): string {
  const zone = Intl.DateTimeFormat().resolvedOptions().timeZone;
  return zone && isTimeZone(zone) ? zone : 'UTC';
}
