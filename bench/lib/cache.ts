/**
 * Things the bench makes once and keeps between runs, under os.tmpdir(): the seeded demo database
 * and the client builds. Each is keyed by a hash of its inputs' contents (not their times: a
 * checkout or a branch switch touches every file), so a second run starts at once and a changed
 * input makes a fresh one. A new entry is made in a folder of its own and renamed into place, so a
 * run cut short never leaves half an entry that a later run would take for whole.
 */
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, readdirSync, readFileSync, renameSync, rmSync, statSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';

/** Where every cached entry lives. */
export const CACHE_BASE = path.join(os.tmpdir(), 'holdline-bench-cache');
const DONE_MARKER = '.holdline-bench-done';
const STALE_MS = 24 * 60 * 60 * 1000;

/** A hash of the contents of `paths` (files, or folders walked in name order) under `root`, 16 hex digits. */
export function hashOf(root: string, paths: string[]): string {
  const hash = createHash('sha256');
  const visit = (relative: string) => {
    const full = path.join(root, relative);
    if (!existsSync(full)) {
      hash.update(`missing ${relative}\n`);
      return;
    }
    if (statSync(full).isDirectory()) {
      for (const entry of readdirSync(full).sort()) visit(path.join(relative, entry));
      return;
    }
    hash.update(`file ${relative}\n`);
    hash.update(readFileSync(full));
  };
  for (const p of paths) visit(p);
  return hash.digest('hex').slice(0, 16);
}

export interface CachedEntry {
  dir: string;
  /** Seconds it took to make it; null when an earlier run's entry was reused. */
  seconds: number | null;
}

/**
 * The folder `<name>-<key>` under CACHE_BASE: reused when a whole one exists (and is younger than
 * `maxAgeMs` when given), else made by `make(dir)` in a fresh folder and renamed into place.
 * Entries of the same name older than a day are removed then (several checkouts may share the
 * cache, each with its own key, so a newer entry does not make an older one useless).
 */
export async function cachedDir(name: string, key: string, make: (dir: string) => Promise<void>, maxAgeMs?: number): Promise<CachedEntry> {
  const dir = path.join(CACHE_BASE, `${name}-${key}`);
  const marker = path.join(dir, DONE_MARKER);
  if (existsSync(marker) && (maxAgeMs === undefined || Date.now() - statSync(marker).mtimeMs < maxAgeMs)) return { dir, seconds: null };
  mkdirSync(CACHE_BASE, { recursive: true });
  const fresh = `${dir}.tmp-${process.pid}-${Date.now()}`;
  const started = performance.now();
  try {
    mkdirSync(fresh, { recursive: true });
    await make(fresh);
    writeFileSync(path.join(fresh, DONE_MARKER), new Date().toISOString());
  } catch (error) {
    rmSync(fresh, { recursive: true, force: true });
    throw error;
  }
  rmSync(dir, { recursive: true, force: true });
  try {
    renameSync(fresh, dir);
  } catch (error) {
    // Another run put the same entry in place meanwhile: theirs is as good as ours.
    rmSync(fresh, { recursive: true, force: true });
    if (!existsSync(marker)) throw error;
  }
  for (const entry of readdirSync(CACHE_BASE)) {
    const other = path.join(CACHE_BASE, entry);
    if (!entry.startsWith(`${name}-`) || other === dir) continue;
    try {
      if (Date.now() - statSync(other).mtimeMs > STALE_MS) rmSync(other, { recursive: true, force: true });
    } catch {
      // removed by another run meanwhile
    }
  }
  return { dir, seconds: (performance.now() - started) / 1000 };
}
