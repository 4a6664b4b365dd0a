/**
 * Scenario 4, memory: the server's resident memory idle (after boot, before any socket), with
 * 1,000 viewers joined (and so per viewer), and its growth over a soak of 20 commands a second
 * with 100 viewers on Holdline, restarted for it (shortened to fit the run's time: 45 s in a full run, 6 s in a quick one).
 * Resident memory is VmRSS of the server process from /proc.
 */
import { CROWD_SETTLE_MS, crowdMemoryOf, IDLE_SETTLE_MS, settledRss, type CrowdMemory } from '../lib/crowd-memory.js';
import { startHoldline } from '../lib/holdline.js';
import { rssBytes } from '../lib/proc.js';
import {
  addCorrectness,
  alternate,
  burst,
  crowdOf,
  figureOf,
  now,
  roundsOf,
  secs,
  Swarm,
  SWARM_SYSTEMS,
  totalCorrectness,
  zeroCorrectness,
  type Rounds,
  type RunValues,
} from '../lib/swarm.js';
import type { Correctness, Scenario, ScenarioOptions, ScenarioResult } from '../lib/types.js';

const SOAK_VIEWERS = 100;
const SOAK_RATE = 20;
const MiB = 1024 * 1024;

/**
 * Soak length in seconds, Holdline only (a baseline soaked for less would read a fresh process's
 * warm-up as its growth, and as long would not fit the run). The issue's two minutes do not fit
 * in a full run of under ten minutes beside everything else: 45 s; 6 s in a quick run.
 */
const soakSeconds = (quick: boolean) => (quick ? 6 : 45);

/** Least-squares slope of (ms, bytes) samples, in MiB a minute. */
function slopeMiBPerMinute(samples: { at: number; rss: number }[]): number {
  if (samples.length < 2) return Number.NaN;
  const mx = samples.reduce((s, p) => s + p.at, 0) / samples.length;
  const my = samples.reduce((s, p) => s + p.rss, 0) / samples.length;
  let num = 0;
  let den = 0;
  for (const p of samples) {
    num += (p.at - mx) * (p.rss - my);
    den += (p.at - mx) ** 2;
  }
  return den === 0 ? Number.NaN : ((num / den) * 60_000) / MiB;
}

/** A system's memory figures from one round's readings. */
function valuesOf(reading: CrowdMemory): RunValues {
  return {
    'memory.idle': reading.idle / MiB,
    'memory.crowd': reading.crowd / MiB,
    'memory.perViewer': (reading.crowd - reading.idle) / reading.joined / 1024,
  };
}

/** Memory idle and with the crowd, read here: each system started, read 1 s after boot, the crowd joined, read again. */
async function readCrowdMemory(options: ScenarioOptions, swarm: Swarm, crowd: number): Promise<Rounds> {
  return alternate(
    options,
    swarm,
    async (server, round) => {
      const notes: string[] = [];
      const correctness = zeroCorrectness();
      const idle = await settledRss(server, IDLE_SETTLE_MS);
      await swarm.attach(server);
      const joined = await swarm.connect(crowd);
      if (joined.failed) notes.push(`${joined.failed} of ${crowd} viewers did not join (${joined.reasons.join(', ')})`);
      const values = valuesOf({ idle, crowd: await settledRss(server, CROWD_SETTLE_MS), joined: joined.joined, round });
      options.log(`    ${server.system}: idle ${values['memory.idle'].toFixed(1)} MiB; with ${joined.joined} viewers ${values['memory.crowd'].toFixed(1)} MiB, ${values['memory.perViewer'].toFixed(1)} KiB per viewer`);
      const counters = await swarm.counters();
      correctness.duplicates += counters.duplicates;
      if (counters.unexpectedDisconnects) notes.push(`${counters.unexpectedDisconnects} viewer connections dropped unasked`);
      if (counters.refusedJoins) notes.push(`${counters.refusedJoins} joins refused (${counters.refusalCodes.join(', ')})`);
      return { values, correctness, notes };
    },
    { attach: false },
  );
}

/**
 * The soak: a fresh Holdline process with 100 fresh viewers, 20 commands a second, resident
 * memory sampled every 0.5 s; the growth is the least-squares slope after the first fifth.
 */
async function soak(options: ScenarioOptions, swarm: Swarm): Promise<{ values: RunValues; correctness: Correctness; notes: string[] }> {
  const values: RunValues = {};
  const correctness = zeroCorrectness();
  const notes: string[] = [];
  const server = await startHoldline();
  try {
    await swarm.attach(server);
    const joined = await swarm.connect(SOAK_VIEWERS);
    if (joined.failed) notes.push(`soak: ${joined.failed} of ${SOAK_VIEWERS} viewers did not join (${joined.reasons.join(', ')})`);
    const seconds = soakSeconds(options.quick);
    const samples: { at: number; rss: number }[] = [];
    const started = now();
    const sampler = setInterval(() => samples.push({ at: now() - started, rss: rssBytes(server.pid()) }), 500);
    try {
      const b = await burst(server, swarm, SOAK_RATE * seconds, SOAK_RATE);
      addCorrectness(correctness, b.correctness);
      notes.push(...b.notes.map((n) => `soak: ${n}`));
    } finally {
      clearInterval(sampler);
    }
    const steady = samples.filter((s) => s.at >= (seconds * 1000) / 5);
    values['memory.soak.growth'] = slopeMiBPerMinute(steady);
    values['memory.soak.end'] = (samples.at(-1)?.rss ?? Number.NaN) / MiB;
    options.log(`    holdline: soak ${secs(seconds * 1000)} at ${SOAK_RATE}/s with ${SOAK_VIEWERS} viewers: ${values['memory.soak.growth'].toFixed(2)} MiB/min`);
    const counters = await swarm.counters();
    correctness.duplicates += counters.duplicates;
    if (counters.unexpectedDisconnects) notes.push(`soak: ${counters.unexpectedDisconnects} viewer connections dropped unasked`);
    if (counters.refusedJoins) notes.push(`soak: ${counters.refusedJoins} joins refused (${counters.refusalCodes.join(', ')})`);
  } finally {
    await server.stop().catch(() => undefined);
  }
  return { values, correctness, notes };
}

export const memory: Scenario = async (options) => {
  const crowdSize = crowdOf(options);
  const many = crowdSize.toLocaleString('en-GB');
  const swarm = Swarm.start(crowdSize);
  try {
    // Scenario 1 read idle and crowd memory on its own servers in this run: taken from there.
    const earlier = crowdMemoryOf(options.quick, SWARM_SYSTEMS);
    let rounds: Rounds;
    if (earlier) {
      rounds = { values: {}, correctness: {}, notes: [] };
      for (const system of SWARM_SYSTEMS) rounds.values[system] = (earlier[system] ?? []).map(valuesOf);
      options.log(`  idle and crowd memory: read by scenario 1 in this run (${SWARM_SYSTEMS.map((s) => `${s} ${earlier[s]?.length ?? 0} round(s)`).join(', ')})`);
    } else {
      rounds = await readCrowdMemory(options, swarm, crowdSize);
    }
    try {
      const soaked = await soak(options, swarm);
      // The soak's figures join Holdline's first round; its counts join Holdline's.
      const holdlineRuns = (rounds.values.holdline ??= []);
      if (holdlineRuns.length === 0) holdlineRuns.push({});
      Object.assign(holdlineRuns[0], soaked.values);
      addCorrectness((rounds.correctness.holdline ??= zeroCorrectness()), soaked.correctness);
      rounds.notes.push(...soaked.notes.map((n) => `holdline: ${n}`));
    } catch (error) {
      const message = (error instanceof Error ? error.message : String(error)).split('\n').slice(0, 3).join(' / ');
      rounds.notes.push(`holdline: the soak failed: ${message}`);
      options.log(`  the soak FAILED: ${message}`);
    }

    const result: ScenarioResult = {
      id: 'memory',
      title: `Memory (idle, per viewer with ${many} joined, Holdline's growth over a soak at 20/s with 100 viewers)`,
      figures: [
        figureOf(rounds, { id: 'memory.idle', label: 'resident memory idle (after boot, no viewer)', unit: 'MiB', better: 'lower', against: 'relay' }),
        figureOf(rounds, { id: 'memory.crowd', label: `resident memory with ${many} viewers joined`, unit: 'MiB', better: 'lower', against: 'relay' }),
        figureOf(rounds, {
          id: 'memory.perViewer',
          label: 'resident memory per connected viewer',
          unit: 'KiB',
          better: 'lower',
          against: 'relay',
          target: { text: '≤ 1.5× the relay', met: (r) => r <= 1.5 },
        }),
        figureOf(rounds, { id: 'memory.soak.growth', label: `growth over the soak (${soakSeconds(options.quick)} s, 100 viewers, 20/s)`, unit: 'MiB/min', better: 'lower' }),
        figureOf(rounds, { id: 'memory.soak.end', label: 'resident memory at the end of the soak', unit: 'MiB', better: 'lower' }),
      ],
      correctness: totalCorrectness(rounds),
      notes: [
        `${roundsOf(options)} round(s); idle and crowd memory ${earlier ? "read during scenario 1's runs in this run (the same servers and crowd, before its commands)" : 'read here'}: VmRSS ${IDLE_SETTLE_MS / 1000} s after boot and ${CROWD_SETTLE_MS / 1000} s after the last join, each after a full garbage collection (SIGUSR2 to a preloaded handler, bench/lib/gc-on-signal.mjs), the median of five readings 0.1 s apart; the soak (${soakSeconds(options.quick)} s, shortened from the issue's two minutes to fit the run) runs on Holdline only, on a fresh process with 100 fresh viewers; growth is the least-squares slope of VmRSS sampled every 0.5 s after the first fifth of the soak`,
        ...(options.quick ? [`quick: ${many} viewers instead of 1,000, one round, a ${soakSeconds(true)} s soak`] : []),
        ...rounds.notes,
      ],
    };
    return result;
  } finally {
    await swarm.close();
  }
};

export default memory;
