/**
 * Scenario 1, command to the last viewer: one board watched by 1,000 and then by 100 viewers (nine
 * more boards idle on the server), legal commands sent at 20 and at 100 a second. For each: p50,
 * p99 and max from a command's send to the first and to the last viewer holding its event,
 * commands committed per second, and the server's CPU time per command. Also how long 1,000
 * viewers take to connect and join at once. Holdline, the bare relay and the SQLite relay
 * alternate, each on a fresh server and the same swarm.
 */
import { CROWD_SETTLE_MS, IDLE_SETTLE_MS, recordCrowdMemory, settledRss } from '../lib/crowd-memory.js';
import {
  addCorrectness,
  alternate,
  burst,
  crowdOf,
  figureOf,
  percentiles,
  roundsOf,
  secs,
  Swarm,
  totalCorrectness,
  zeroCorrectness,
  type FigureSpec,
  type RunValues,
} from '../lib/swarm.js';
import type { Correctness, Figure, Scenario, ScenarioResult } from '../lib/types.js';

const SMALL = 100;
const RATES = [20, 100] as const;

/** How many seconds each rate is sent for. */
const seconds = (quick: boolean, rate: number) => (quick ? 1 : rate === 20 ? 2.5 : 1.5);

/** The rates sent to a crowd of `viewers`: a quick run leaves out 100 viewers at 100/s (their CPU target is checked at 20/s there). */
const ratesFor = (quick: boolean, viewers: number): readonly number[] => (quick && viewers === SMALL ? [20] : RATES);

/** The pause before each measured rate: longer after sockets were closed (the crowd shrinking to 100) than after a rate. */
const QUIET_AFTER_SHRINK_MS = 1000;
const QUIET_MS = 500;
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

const key = (viewers: number, rate: number, what: string) => `latency.${viewers}v.${rate}hz.${what}`;
const many = (n: number) => n.toLocaleString('en-GB');

export const latency: Scenario = async (options) => {
  const CROWD = crowdOf(options);
  const joinKey = `latency.${CROWD}v.join`;
  const swarm = Swarm.start(CROWD);
  try {
    const rounds = await alternate(
      options,
      swarm,
      async (server, round) => {
      const values: RunValues = {};
      const correctness: Correctness = zeroCorrectness();
      const notes: string[] = [];
      // Scenario 4's memory figures are read here, on this server and this crowd (bench/lib/crowd-memory.ts).
      const idle = await settledRss(server, IDLE_SETTLE_MS);
      await swarm.attach(server);
      const joined = await swarm.connect(CROWD);
      values[joinKey] = joined.allJoinedMs;
      options.log(`    ${server.system}: ${joined.joined} viewers joined in ${secs(joined.allJoinedMs)}${joined.failed ? `, ${joined.failed} failed (${joined.reasons.join(', ')})` : ''}`);
      if (joined.failed) notes.push(`${joined.failed} of ${CROWD} viewers did not join (${joined.reasons.join(', ')})`);
      const crowd = await settledRss(server, CROWD_SETTLE_MS);
      if (joined.joined > 0) recordCrowdMemory(options.quick, server.system, { idle, crowd, joined: joined.joined, round });
      // A short warm-up at the slow rate, not counted: the first commands of a fresh process compile code.
      const warm = await burst(server, swarm, options.quick ? 10 : 20, 20);
      addCorrectness(correctness, warm.correctness);
      for (const viewers of [CROWD, SMALL]) {
        if (swarm.viewerCount > viewers) await swarm.shrinkTo(viewers);
        for (const rate of ratesFor(options.quick, viewers)) {
          // A quiet second first: the server and the swarm are still busy with 900 sockets closing (or
          // the previous rate's backlog), which would land on this rate's first commands.
          await sleep(rate === RATES[0] && viewers === SMALL ? QUIET_AFTER_SHRINK_MS : QUIET_MS);
          const b = await burst(server, swarm, rate * seconds(options.quick, rate), rate);
          addCorrectness(correctness, b.correctness);
          notes.push(...b.notes.map((n) => `${many(viewers)} viewers at ${rate}/s: ${n}`));
          const first = percentiles(b.latencies.toFirst);
          const last = percentiles(b.latencies.toLast);
          Object.assign(values, {
            [key(viewers, rate, 'first.p50')]: first.p50,
            [key(viewers, rate, 'first.p99')]: first.p99,
            [key(viewers, rate, 'first.max')]: first.max,
            [key(viewers, rate, 'last.p50')]: last.p50,
            [key(viewers, rate, 'last.p99')]: last.p99,
            [key(viewers, rate, 'last.max')]: last.max,
            [key(viewers, rate, 'committed')]: b.committedPerSecond,
            [key(viewers, rate, 'cpu')]: b.cpuMsPerCommand,
          });
          options.log(
            `    ${server.system}: ${many(viewers)} viewers at ${rate}/s: last p50 ${last.p50.toFixed(0)} ms, p99 ${last.p99.toFixed(0)} ms; ` +
              `${b.committedPerSecond.toFixed(1)} committed/s; ${b.cpuMsPerCommand.toFixed(2)} ms CPU/command`,
          );
        }
      }
      const counters = await swarm.counters();
      correctness.duplicates += counters.duplicates;
      if (counters.redeliveries) notes.push(`${counters.redeliveries} events delivered again to a viewer that held them (dropped by seq, not counted as duplicates)`);
      if (counters.unexpectedDisconnects) notes.push(`${counters.unexpectedDisconnects} viewer connections dropped unasked`);
      if (counters.refusedJoins) notes.push(`${counters.refusedJoins} joins refused (${counters.refusalCodes.join(', ')})`);
      return { values, correctness, notes };
      },
      { attach: false },
    );

    const figures: Figure[] = [
      figureOf(rounds, {
        id: joinKey,
        label: `${many(CROWD)} viewers connect and join at once, until the last is answered`,
        unit: 'ms',
        better: 'lower',
        against: 'relay',
        target: { text: '≤ 1.5× the relay', met: (r) => r <= 1.5 },
      }),
    ];
    for (const viewers of [CROWD, SMALL]) {
      for (const rate of ratesFor(options.quick, viewers)) {
        const where = `(${many(viewers)} viewers, ${rate}/s)`;
        const specs: FigureSpec[] = [];
        for (const to of ['first', 'last'] as const) {
          for (const stat of ['p50', 'p99', 'max'] as const) {
            const spec: FigureSpec = { id: key(viewers, rate, `${to}.${stat}`), label: `send → ${to} viewer, ${stat} ${where}`, unit: 'ms', better: 'lower', against: 'sqlite-relay' };
            if (viewers === CROWD && rate === 20 && to === 'last' && stat === 'p50') spec.target = { text: '≤ 1.2× the SQLite relay', met: (r) => r <= 1.2 };
            if (viewers === CROWD && rate === 20 && to === 'last' && stat === 'p99') spec.target = { text: '≤ 1.5× the SQLite relay', met: (r) => r <= 1.5 };
            specs.push(spec);
          }
        }
        const committed: FigureSpec = { id: key(viewers, rate, 'committed'), label: `commands committed per second ${where}`, unit: 'cmd/s', better: 'higher', against: 'sqlite-relay' };
        if (viewers === CROWD && rate === 100) {
          // "Keeps up" is 95 % of the offered rate; where the SQLite relay does not keep up either, Holdline is held to 95 % of what it committed.
          committed.target = {
            text: 'keeps up (≥ 95 % of the offered rate) wherever the SQLite relay keeps up',
            met: (_ratio, values) => {
              const baseline = values['sqlite-relay']?.median ?? Number.NaN;
              const holdline = values.holdline?.median ?? Number.NaN;
              return baseline >= 0.95 * rate ? holdline >= 0.95 * rate : holdline >= 0.95 * baseline;
            },
          };
        }
        specs.push(committed);
        const cpu: FigureSpec = { id: key(viewers, rate, 'cpu'), label: `server CPU per command ${where}`, unit: 'ms', better: 'lower', against: 'sqlite-relay' };
        if (viewers === SMALL) cpu.target = { text: '≤ 1.5× the SQLite relay', met: (r) => r <= 1.5 };
        specs.push(cpu);
        figures.push(...specs.map((spec) => figureOf(rounds, spec)));
      }
    }
    const correctness = totalCorrectness(rounds);
    const result: ScenarioResult = {
      id: 'latency',
      title: `Command to the last viewer (one board, nine idle; ${many(CROWD)} then 100 viewers; 20 and 100 commands a second)`,
      figures,
      correctness,
      notes: [
        `${roundsOf(options)} round(s); each rate sent for ${seconds(options.quick, 20)} s (20/s) and ${seconds(options.quick, 100)} s (100/s) after ${options.quick ? 10 : 20} warm-up commands, each after ${QUIET_MS / 1000} s without traffic (${QUIET_AFTER_SHRINK_MS / 1000} s after the crowd shrank to 100); send and arrival times on one clock across processes; CPU from /proc of the server process, from the first send until every viewer held the last event; the three systems of a round start side by side before its first run; scenario 4's idle and crowd memory is read here, ${IDLE_SETTLE_MS / 1000} s after boot and ${CROWD_SETTLE_MS / 1000} s after the last join, each after a full garbage collection`,
        ...(options.quick ? [`quick: ${many(CROWD)} viewers instead of 1,000 (figure ids carry the crowd's size; the targets the issue sets for 1,000 viewers are applied to it), one round, 1 s windows, no run of 100 viewers at 100/s`] : []),
        ...rounds.notes,
      ],
    };
    return result;
  } finally {
    await swarm.close();
  }
};

export default latency;
