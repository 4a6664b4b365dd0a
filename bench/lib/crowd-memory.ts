/**
 * Resident memory of a system idle and with the crowd joined. Scenario 1 (latency) reads it on the
 * servers and the crowd it starts anyway, and scenario 4 (memory) reports it from there in the
 * same run, instead of starting every system and connecting the crowd once more; a memory
 * scenario run on its own (`--only memory`) reads it itself the same way.
 */
import path from 'node:path';
import { rssBytes } from './proc.js';
import { median } from './stats.js';
import type { BenchServer, System } from './types.js';

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** Settle times before the collection and the readings: 1 s after boot for idle, 1 s after the last join. */
export const IDLE_SETTLE_MS = 1000;
export const CROWD_SETTLE_MS = 1000;

/** Node arguments for every measured server: a full collection on SIGUSR2 (gc-on-signal.mjs). */
export const GC_NODE_ARGS = ['--expose-gc', '--import', path.join(import.meta.dirname, 'gc-on-signal.mjs')];

/**
 * After `settleMs` without traffic, a full collection (SIGUSR2, GC_NODE_ARGS), then the median of
 * a few readings a tenth of a second apart: without the collection a 300-viewer crowd is smaller
 * than the garbage still resident from start-up, and a relay's memory per viewer came out negative.
 */
export async function settledRss(server: BenchServer, settleMs: number): Promise<number> {
  await sleep(settleMs);
  process.kill(server.pid(), 'SIGUSR2');
  await sleep(300);
  const readings: number[] = [];
  for (let i = 0; i < 5; i++) {
    readings.push(rssBytes(server.pid()));
    await sleep(100);
  }
  return median(readings);
}

/** One system's memory in one round: bytes idle and with the crowd, and how many viewers joined. */
export interface CrowdMemory {
  idle: number;
  crowd: number;
  joined: number;
  round: number;
}

/** What this run read so far, per system, and whether it was a quick run (a full memory scenario does not take a quick run's readings). */
const readings: { quick: boolean | null; bySystem: Partial<Record<System, CrowdMemory[]>> } = { quick: null, bySystem: {} };

/** Keeps one reading. */
export function recordCrowdMemory(quick: boolean, system: System, reading: CrowdMemory): void {
  if (readings.quick !== quick) {
    readings.quick = quick;
    readings.bySystem = {};
  }
  (readings.bySystem[system] ??= []).push(reading);
}

/** This run's readings for these systems, or null when one of them has none (then the memory scenario reads them itself). */
export function crowdMemoryOf(quick: boolean, systems: readonly System[]): Partial<Record<System, CrowdMemory[]>> | null {
  if (readings.quick !== quick) return null;
  if (!systems.every((s) => (readings.bySystem[s]?.length ?? 0) > 0)) return null;
  return readings.bySystem;
}
