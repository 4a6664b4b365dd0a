/**
 * Scenario 4, memory: the server's resident memory idle (after boot, before any socket), with
 * 1,000 viewers joined (and so per viewer), and its growth over a soak of 20 commands a second
 * with 100 viewers on Holdline, restarted for it (two minutes in a full run, 15 s in a quick one).
 * Resident memory is VmRSS of the server process from /proc.
 */
import { rssBytes } from '../lib/proc.js';
import { median } from '../lib/stats.js';
import { addCorrectness, alternate, burst, figureOf, now, roundsOf, secs, Swarm, totalCorrectness, zeroCorrectness, type RunValues } from '../lib/swarm.js';
import type { BenchServer, Correctness, Scenario, ScenarioResult } from '../lib/types.js';

const CROWD = 1000;
const SOAK_VIEWERS = 100;
const SOAK_RATE = 20;
const MiB = 1024 * 1024;

/** Soak length in seconds (Holdline only: a baseline soaked for less would read a fresh process's warm-up as its growth, and as long would not fit the run). */
const soakSeconds = (quick: boolean) => (quick ? 15 : 120);

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/**
 * The median of a few readings a tenth of a second apart, after `settleMs` without traffic: one
 * reading can catch a collection half done, and right after 1,000 joins the garbage of their
 * answers is still resident.
 */
async function settledRss(server: BenchServer, settleMs: number): Promise<number> {
  await sleep(settleMs);
  const readings: number[] = [];
  for (let i = 0; i < 5; i++) {
    readings.push(rssBytes(server.pid()));
    await sleep(100);
  }
  return median(readings);
}

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

export const memory: Scenario = async (options) => {
  const swarm = Swarm.start(CROWD);
  try {
    const rounds = await alternate(
      options,
      swarm,
      async (server, round) => {
        const values: RunValues = {};
        const correctness: Correctness = zeroCorrectness();
        const notes: string[] = [];
        const idle = await settledRss(server, 1000);
        await swarm.attach(server);
        const joined = await swarm.connect(CROWD);
        if (joined.failed) notes.push(`${joined.failed} of ${CROWD} viewers did not join (${joined.reasons.join(', ')})`);
        const crowd = await settledRss(server, 2500);
        values['memory.idle'] = idle / MiB;
        values['memory.crowd'] = crowd / MiB;
        values['memory.perViewer'] = (crowd - idle) / joined.joined / 1024;
        options.log(`    ${server.system}: idle ${(idle / MiB).toFixed(1)} MiB; with ${joined.joined} viewers ${(crowd / MiB).toFixed(1)} MiB, ${values['memory.perViewer'].toFixed(1)} KiB per viewer`);

        // Holdline's soak runs once, in the first round: its length would not fit three times in a
        // full run. It starts on a fresh process with 100 fresh viewers, so the memory 900 closed
        // sockets give back is not read as the soak's trend.
        if (round === 1 && server.system === 'holdline') {
          const before = await swarm.counters();
          correctness.duplicates += before.duplicates;
          await swarm.shrinkTo(0);
          await server.restart();
          await swarm.attach(server);
          await swarm.connect(SOAK_VIEWERS);
          const seconds = soakSeconds(options.quick);
          const samples: { at: number; rss: number }[] = [];
          const started = now();
          const sampler = setInterval(() => samples.push({ at: now() - started, rss: rssBytes(server.pid()) }), 500);
          try {
            const soak = await burst(server, swarm, SOAK_RATE * seconds, SOAK_RATE);
            addCorrectness(correctness, soak.correctness);
            notes.push(...soak.notes.map((n) => `soak: ${n}`));
          } finally {
            clearInterval(sampler);
          }
          // The first fifth is the server settling after 900 viewers left; the growth is read over the rest.
          const steady = samples.filter((s) => s.at >= (seconds * 1000) / 5);
          values['memory.soak.growth'] = slopeMiBPerMinute(steady);
          values['memory.soak.end'] = (samples.at(-1)?.rss ?? Number.NaN) / MiB;
          options.log(`    ${server.system}: soak ${secs(seconds * 1000)} at ${SOAK_RATE}/s with ${SOAK_VIEWERS} viewers: ${values['memory.soak.growth'].toFixed(2)} MiB/min`);
        }
        // After a soak these count its part only: the first part's duplicates were added before it.
        const counters = await swarm.counters();
        correctness.duplicates += counters.duplicates;
        if (counters.unexpectedDisconnects) notes.push(`${counters.unexpectedDisconnects} viewer connections dropped unasked`);
        if (counters.refusedJoins) notes.push(`${counters.refusedJoins} joins refused (${counters.refusalCodes.join(', ')})`);
        return { values, correctness, notes };
      },
      { attach: false },
    );

    const result: ScenarioResult = {
      id: 'memory',
      title: "Memory (idle, per viewer with 1,000 joined, Holdline's growth over a soak at 20/s with 100 viewers)",
      figures: [
        figureOf(rounds, { id: 'memory.idle', label: 'resident memory idle (after boot, no viewer)', unit: 'MiB', better: 'lower', against: 'relay' }),
        figureOf(rounds, { id: 'memory.crowd', label: 'resident memory with 1,000 viewers joined', unit: 'MiB', better: 'lower', against: 'relay' }),
        figureOf(rounds, {
          id: 'memory.perViewer',
          label: 'resident memory per connected viewer',
          unit: 'KiB',
          better: 'lower',
          against: 'relay',
          target: { text: '≤ 1.5× the relay', met: (r) => r <= 1.5 },
        }),
        figureOf(rounds, { id: 'memory.soak.growth', label: 'growth over the soak (100 viewers, 20/s)', unit: 'MiB/min', better: 'lower' }),
        figureOf(rounds, { id: 'memory.soak.end', label: 'resident memory at the end of the soak', unit: 'MiB', better: 'lower' }),
      ],
      correctness: totalCorrectness(rounds),
      notes: [
        `${roundsOf(options)} round(s); the soak (${soakSeconds(options.quick)} s) runs on Holdline only, in the first round, on the same data after a restart (SIGKILL) with 100 fresh viewers; resident memory is read 1 s after boot and 2.5 s after the last join; growth is the least-squares slope of VmRSS sampled every 0.5 s after the first fifth of the soak`,
        ...rounds.notes,
      ],
    };
    return result;
  } finally {
    await swarm.close();
  }
};

export default memory;
