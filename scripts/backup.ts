/**
 * `npm run backup -- <file> [--force]`: a consistent copy of the live Holdline database, taken with
 * SQLite's online backup (better-sqlite3's `db.backup`) while the server runs and crews keep
 * sending commands. The live file is opened read-only; the copy is written beside the target
 * under a temporary name, checked (SQLite's integrity check and every job's hash chain) and only
 * then moved into place, readable by its owner only. An existing file is never overwritten without `--force`.
 *
 * The live database is HOLDLINE_DB (as the server reads it; default data/holdline.sqlite).
 * Restoring is described in README.md ("Backups and restore").
 */
import { chmodSync, existsSync, renameSync, rmSync, statSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import Database from 'better-sqlite3';
import { ChainWalker, type ChainCheck, type ChainedEvent } from '../shared/events/chain.js';
import { loadConfig } from '../server/config.js';

export interface JobChainState {
  id: string;
  name: string;
  state: string;
  lastSeq: number;
  headHash: string;
  check: ChainCheck;
}

export interface BackupReport {
  source: string;
  target: string;
  bytes: number;
  pages: number;
  jobs: JobChainState[];
}

/** A refusal the command line prints as it is, without a stack. */
export class BackupError extends Error {}

/**
 * Copies `source` (the live database) to `target`. The copy is made in one backup step, so it
 * is one committed state of the database however busy the server is: SQLite reads it inside a
 * single read transaction, which in WAL mode never waits for the server's writes nor holds them up.
 */
export async function takeBackup(options: { source: string; target: string; force?: boolean }): Promise<BackupReport> {
  const source = path.resolve(options.source);
  const target = path.resolve(options.target);
  if (source === target) throw new BackupError('The backup cannot be written over the live database itself.');
  if (!existsSync(source)) throw new BackupError(`There is no database at ${source}. Set HOLDLINE_DB to the file the server uses.`);
  if (existsSync(target) && !options.force) throw new BackupError(`${target} already exists. Choose a new file name, or add --force to replace it.`);
  if (!existsSync(path.dirname(target))) throw new BackupError(`The folder ${path.dirname(target)} does not exist.`);

  const partial = `${target}.partial-${process.pid}`;
  // The copy holds password and token hashes: readable by its owner only, from the first byte on
  // (SQLite gives its journal the file's own permissions).
  writeFileSync(partial, '', { flag: 'wx', mode: 0o600 });
  let pages: number;
  try {
    const live = new Database(source, { readonly: true, fileMustExist: true });
    try {
      live.pragma('busy_timeout = 5000');
      // After the first step has sized the copy, ask for every remaining page at once: one read
      // transaction, one consistent state (a copy taken in slices restarts whenever the server writes).
      const done = await live.backup(partial, { progress: () => 0x7fffffff });
      pages = done.totalPages;
    } finally {
      live.close();
    }
  } catch (error) {
    removeWithCompanions(partial);
    throw error;
  }

  let jobs: JobChainState[];
  try {
    const copy = new Database(partial, { fileMustExist: true });
    try {
      // A backup is one self-contained file: no -wal beside it to lose on the way to safe storage.
      copy.pragma('journal_mode = DELETE');
      const integrity = copy.pragma('integrity_check', { simple: true });
      if (integrity !== 'ok') throw new BackupError(`The copy failed SQLite's integrity check: ${String(integrity)}`);
      jobs = chainStates(copy);
    } finally {
      copy.close();
    }
    if (existsSync(target) && !options.force) throw new BackupError(`${target} appeared while the backup was running. Nothing was replaced.`);
    // Stale companions of an older file of that name would be read as part of the new copy.
    rmSync(`${target}-wal`, { force: true });
    rmSync(`${target}-shm`, { force: true });
    chmodSync(partial, 0o600);
    renameSync(partial, target);
  } catch (error) {
    removeWithCompanions(partial);
    throw error;
  }
  return { source, target, bytes: statSync(target).size, pages, jobs };
}

/** Every job's log walked with the same chain check the server and `npm run verify-record` use, then compared with the job row's head. */
export function chainStates(db: Database.Database): JobChainState[] {
  const jobs = db.prepare('SELECT id, name, state, last_seq AS lastSeq, head_hash AS headHash FROM job ORDER BY created_at, id').all() as Omit<JobChainState, 'check'>[];
  const events = db.prepare(
    'SELECT job_id AS jobId, seq, command_id AS commandId, type, by_user_id AS byUserId, by_name AS byName, role, at, data, prev_hash AS prevHash, hash FROM job_event WHERE job_id = ? ORDER BY seq, id',
  );
  return jobs.map((job) => {
    const walker = new ChainWalker();
    for (const row of events.iterate(job.id) as Iterable<Record<string, unknown>>) {
      if (!walker.push({ ...row, data: JSON.parse(row.data as string) } as ChainedEvent)) break;
    }
    return { ...job, check: walker.result({ lastSeq: job.lastSeq, headHash: job.headHash }) };
  });
}

function removeWithCompanions(file: string): void {
  for (const f of [file, `${file}-wal`, `${file}-shm`, `${file}-journal`]) rmSync(f, { force: true });
}

/** The report in words, one line per job. */
export function describeBackup(report: BackupReport): string {
  const lines = [`Wrote ${report.target} (${report.bytes} bytes, ${report.pages} pages), a consistent copy of ${report.source}.`];
  if (!report.jobs.length) lines.push('It holds no jobs.');
  for (const job of report.jobs) {
    const { check } = job;
    lines.push(
      check.valid
        ? `  ${job.name} (${job.id}, ${job.state}): ${check.checked} events, chain verified, head ${check.finalHash}`
        : `  ${job.name} (${job.id}, ${job.state}): CHAIN BROKEN at seq ${check.firstBadSeq} (${check.problem}); ${check.checked} events verified before it`,
    );
  }
  return lines.join('\n');
}

async function main(argv: string[]): Promise<number> {
  const force = argv.includes('--force');
  const files = argv.filter((a) => a !== '--force');
  if (files.length !== 1 || files[0].startsWith('-')) {
    console.error('Usage: npm run backup -- <backup file> [--force]\n  Copies the database named by HOLDLINE_DB (default data/holdline.sqlite) while the server runs.');
    return 2;
  }
  try {
    const report = await takeBackup({ source: loadConfig().databasePath, target: files[0], force });
    console.log(describeBackup(report));
    if (report.jobs.some((j) => !j.check.valid)) {
      console.error('The copy was written, but a job’s chain does not verify: the live database has the same problem. Keep this copy and the live file, and find out why before restoring anything.');
      return 3;
    }
    return 0;
  } catch (error) {
    console.error(`Backup not written: ${error instanceof Error ? error.message : String(error)}`);
    return 1;
  }
}

if (process.argv[1] && import.meta.url === pathToFileURL(path.resolve(process.argv[1])).href) {
  main(process.argv.slice(2)).then((code) => process.exit(code));
}
