/**
 * The client builds the client scenario loads: Holdline's own client and the empty Quasar page
 * (bench/empty-page), each built with Vite once per set of inputs and kept between runs
 * (bench/lib/cache.ts), never into the repository's shared dist/.
 */
import { spawn } from 'node:child_process';
import path from 'node:path';
import { cachedDir, hashOf, type CachedEntry } from './cache.js';
import { track } from './proc.js';

const root = path.resolve(import.meta.dirname, '..', '..');

/** What Holdline's client build depends on. */
const CLIENT_INPUTS = ['src', 'shared', 'public', 'index.html', 'vite.config.ts', 'tsconfig.json', 'tsconfig.app.json', 'package-lock.json'];
/** What the empty page's build depends on. */
const EMPTY_INPUTS = ['bench/empty-page', 'package-lock.json'];

/** Runs a command in the repository, rejecting with the end of its output when it fails. */
function run(command: string, args: string[]): Promise<void> {
  return new Promise((resolve, reject) => {
    const child = spawn(command, args, { cwd: root, stdio: ['ignore', 'pipe', 'pipe'] });
    track(child);
    let output = '';
    child.stdout.on('data', (d: Buffer) => (output += d.toString()));
    child.stderr.on('data', (d: Buffer) => (output += d.toString()));
    child.once('error', reject);
    child.once('exit', (code) => (code === 0 ? resolve() : reject(new Error(`${command} ${args.join(' ')} failed (${code}):\n${output.slice(-3000)}`))));
  });
}

const vite = (outDir: string, extraArgs: string[]) =>
  run(path.join(root, 'node_modules', '.bin', 'vite'), ['build', ...extraArgs, '--outDir', outDir, '--emptyOutDir', '--logLevel', 'warn']);

let clientBuild: Promise<CachedEntry> | null = null;
let emptyBuild: Promise<CachedEntry> | null = null;

/** Holdline's client, built once per set of inputs (a failed build is tried again on the next call). */
export function holdlineClientBuild(): Promise<CachedEntry> {
  clientBuild ??= cachedDir('client', hashOf(root, CLIENT_INPUTS), (dir) => vite(dir, []));
  clientBuild.catch(() => (clientBuild = null));
  return clientBuild;
}

/** The empty Quasar page, built once per set of inputs. */
export function emptyPageBuild(): Promise<CachedEntry> {
  emptyBuild ??= cachedDir('empty-page', hashOf(root, EMPTY_INPUTS), (dir) => vite(dir, ['--config', path.join(root, 'bench', 'empty-page', 'vite.config.ts')]));
  emptyBuild.catch(() => (emptyBuild = null));
  return emptyBuild;
}

/** Both builds, one after the other (two Vite builds at once on two cores take as long and risk memory). */
export async function clientBuilds(): Promise<{ holdline: CachedEntry; empty: CachedEntry }> {
  const holdline = await holdlineClientBuild();
  const empty = await emptyPageBuild();
  return { holdline, empty };
}
