import { execFileSync, type ChildProcess } from 'node:child_process';
import { readdirSync, readFileSync } from 'node:fs';

let ticks: number | undefined;

/** Clock ticks a second (`getconf CLK_TCK`), the unit of utime and stime in /proc/<pid>/stat. */
export function clockTicks(): number {
  if (ticks === undefined) {
    const answer = Number.parseInt(execFileSync('getconf', ['CLK_TCK'], { encoding: 'utf8' }).trim(), 10);
    // Linux has used 100 everywhere for years; a broken getconf should not stop a run.
    ticks = Number.isFinite(answer) && answer > 0 ? answer : 100;
  }
  return ticks;
}

/** The fields of /proc/<pid>/stat after the command name, which may itself hold spaces and parentheses. */
function statFields(pid: number): string[] {
  const text = readFileSync(`/proc/${pid}/stat`, 'utf8');
  return text.slice(text.lastIndexOf(')') + 2).split(' ');
}

/** CPU time the process has used so far, user plus system, in ms (its own threads, not its children). */
export function cpuMs(pid: number): number {
  const fields = statFields(pid);
  // After "pid (comm) " the state is field 3; utime and stime are fields 14 and 15.
  const utime = Number(fields[14 - 3]);
  const stime = Number(fields[15 - 3]);
  return ((utime + stime) * 1000) / clockTicks();
}

/** Resident memory of the process in bytes (VmRSS of /proc/<pid>/status). */
export function rssBytes(pid: number): number {
  const status = readFileSync(`/proc/${pid}/status`, 'utf8');
  const match = /^VmRSS:\s+(\d+)\s+kB$/m.exec(status);
  if (!match) throw new Error(`no VmRSS for process ${pid}`);
  return Number(match[1]) * 1024;
}

/** Every process below `pid` (children, grandchildren, ...), read from /proc, deepest last. */
export function descendantsOf(pid: number): number[] {
  const parentOf = new Map<number, number>();
  for (const entry of readdirSync('/proc')) {
    if (!/^\d+$/.test(entry)) continue;
    try {
      parentOf.set(Number(entry), Number(statFields(Number(entry))[4 - 3]));
    } catch {
      // the process ended while the list was read
    }
  }
  const found: number[] = [];
  let frontier = [pid];
  while (frontier.length > 0) {
    const next: number[] = [];
    for (const [child, parent] of parentOf) if (frontier.includes(parent)) next.push(child);
    found.push(...next);
    frontier = next;
  }
  return found;
}

const tracked = new Set<ChildProcess>();

/** Remembers a child so that `killTracked` ends it (the runner calls it on exit and on Ctrl-C). */
export function track(child: ChildProcess): ChildProcess {
  tracked.add(child);
  child.once('exit', () => tracked.delete(child));
  return child;
}

/** The command name of a process (/proc/<pid>/comm), or '' when it has ended. */
function commandName(pid: number): string {
  try {
    return readFileSync(`/proc/${pid}/comm`, 'utf8').trim();
  } catch {
    return '';
  }
}

/**
 * SIGKILLs every tracked child and every process still below this one but those in `spare`;
 * synchronous, so it works in an 'exit' handler. Between scenarios (`keepCompiler`) it also spares
 * tsx's esbuild service, which compiles every module imported later and may have been started
 * after the first scenario began: killing it fails the next import with "The service is no longer running".
 */
export function killTracked(spare: ReadonlySet<number> = new Set(), keepCompiler = false): void {
  for (const child of tracked) if (child.pid !== undefined && child.exitCode === null && child.signalCode === null) child.kill('SIGKILL');
  tracked.clear();
  // Children a scenario started without tracking them, and their own children (a tsx launcher's server).
  for (const pid of descendantsOf(process.pid).reverse()) {
    if (spare.has(pid) || (keepCompiler && commandName(pid) === 'esbuild')) continue;
    try {
      process.kill(pid, 'SIGKILL');
    } catch {
      // already gone
    }
  }
}
