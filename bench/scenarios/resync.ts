/**
 * Scenario 3, resync. Half of 1,000 viewers drop while 200 commands are committed, then return,
 * each joining after the last seq it holds: the time until every one of them holds every event,
 * and the bytes the server sent each returning viewer (its join answer plus the live events until
 * it was in sync) against the bytes of the events it missed. Then a restart storm: the server is
 * killed and started again on the same data under all 1,000 viewers, which reconnect by
 * themselves as the board does and rejoin: the time until all of them are back and in sync, and
 * 20 more commands that every viewer must receive afterwards. The bare relay forgets everything
 * on a restart, so the storm is measured on Holdline and the SQLite relay.
 */
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
  totalCorrectness,
  zeroCorrectness,
  type RunValues,
} from '../lib/swarm.js';
import { median } from '../lib/stats.js';
import type { Correctness, Scenario, ScenarioResult } from '../lib/types.js';

const MISSED = 200;
/** The rate the missed commands are sent at while half the viewers are away. */
const MISSED_RATE = 100;
const AFTER_STORM = 20;

export const resync: Scenario = async (options) => {
  const VIEWERS = crowdOf(options);
  const DROPPED = VIEWERS / 2;
  const many = (n: number) => n.toLocaleString('en-GB');
  const swarm = Swarm.start(VIEWERS);
  try {
    const rounds = await alternate(options, swarm, async (server) => {
      const values: RunValues = {};
      const correctness: Correctness = zeroCorrectness();
      const notes: string[] = [];
      const joined = await swarm.connect(VIEWERS);
      if (joined.failed) notes.push(`${joined.failed} of ${VIEWERS} viewers did not join (${joined.reasons.join(', ')})`);
      addCorrectness(correctness, (await burst(server, swarm, 10, 20)).correctness);

      // Half drop; the other half stay and take the 200 commands live.
      await swarm.drop(DROPPED);
      const away = await burst(server, swarm, MISSED, MISSED_RATE);
      addCorrectness(correctness, away.correctness);
      notes.push(...away.notes);
      const missedBytes = away.sent.filter((c) => c.ok).reduce((sum, c) => sum + c.eventBytes, 0);
      const back = await swarm.rejoin(away.to);
      correctness.gaps += back.gaps;
      const perViewer = back.answerBytes.map((b, i) => b + back.liveBytes[i]);
      const bytes = median(perViewer);
      values['resync.halfdrop.ms'] = back.allSyncedMs;
      values['resync.halfdrop.bytes'] = bytes / 1024;
      values['resync.halfdrop.bytesRatio'] = missedBytes > 0 ? bytes / missedBytes : Number.NaN;
      values['resync.halfdrop.missed'] = missedBytes / 1024;
      const modes = Object.entries(back.modes).map(([m, n]) => `${n} ${m}`).join(', ');
      options.log(
        `    ${server.system}: ${back.returned} returning viewers in sync in ${secs(back.allSyncedMs)}; ` +
          `${(bytes / 1024).toFixed(1)} KiB each for ${(missedBytes / 1024).toFixed(1)} KiB of missed events (answers: ${modes})`,
      );
      if (back.notSynced) notes.push(`${back.notSynced} returning viewers were not in sync in time`);
      if (back.modes.snapshot) notes.push(`${back.modes.snapshot} returning viewers were answered with a snapshot`);

      // The storm restarts the server and rejoins every viewer: a full run's, left out of a quick one to fit its two minutes.
      if (server.system !== 'relay' && !options.quick) {
        const before = await swarm.counters();
        const since = now();
        await server.restart();
        const upAt = now();
        const storm = await swarm.awaitSync(away.to, since, 90_000);
        values['resync.restart.ms'] = storm.lastSyncedAt - since;
        values['resync.restart.afterBootMs'] = storm.lastSyncedAt - upAt;
        correctness.gaps += storm.gaps;
        options.log(`    ${server.system}: restart storm: up again in ${secs(upAt - since)}, all ${VIEWERS} viewers back and in sync ${secs(storm.lastSyncedAt - since)} after the kill`);
        if (storm.notSynced) notes.push(`restart storm: ${storm.notSynced} viewers not in sync in time (${storm.notRejoined} never joined again)`);
        // Back in the room, not only answered: every viewer takes the next commands live.
        const after = await burst(server, swarm, AFTER_STORM, 20);
        addCorrectness(correctness, after.correctness);
        notes.push(...after.notes.map((n) => `after the restart: ${n}`));
        const counters = await swarm.counters();
        const dropped = counters.unexpectedDisconnects - before.unexpectedDisconnects;
        if (dropped !== VIEWERS) notes.push(`restart storm: ${dropped} viewer disconnections seen for ${VIEWERS} viewers`);
      }
      const counters = await swarm.counters();
      correctness.duplicates += counters.duplicates;
      if (counters.redeliveries) notes.push(`${counters.redeliveries} events delivered again to a viewer that held them (dropped by seq, not counted as duplicates)`);
      if (counters.refusedJoins) notes.push(`${counters.refusedJoins} joins refused (${counters.refusalCodes.join(', ')})`);
      return { values, correctness, notes };
    });

    const result: ScenarioResult = {
      id: 'resync',
      title: `Resync (${many(DROPPED)} of ${many(VIEWERS)} viewers drop while 200 commands commit${options.quick ? '' : `; restart storm under ${many(VIEWERS)} viewers`})`,
      figures: [
        figureOf(rounds, {
          id: 'resync.halfdrop.ms',
          label: `${many(DROPPED)} returning viewers: rejoin until every one holds every event`,
          unit: 'ms',
          better: 'lower',
          against: 'relay',
          target: { text: '≤ 1.5× the relay', met: (r) => r <= 1.5 },
        }),
        figureOf(rounds, { id: 'resync.halfdrop.bytes', label: 'bytes sent per returning viewer (join answer + live events until in sync), median', unit: 'KiB', better: 'lower', against: 'sqlite-relay' }),
        figureOf(rounds, { id: 'resync.halfdrop.missed', label: 'bytes of the 200 missed events themselves', unit: 'KiB', better: 'lower' }),
        figureOf(rounds, {
          id: 'resync.halfdrop.bytesRatio',
          label: 'bytes per returning viewer over the bytes of the events it missed',
          unit: '×',
          better: 'lower',
          target: { text: '≤ 2× the events missed', met: (v) => v <= 2 },
        }),
        ...(options.quick
          ? []
          : [
              figureOf(rounds, { id: 'resync.restart.ms', label: `restart storm: from the kill until all ${many(VIEWERS)} viewers are back and in sync`, unit: 'ms', better: 'lower', against: 'sqlite-relay' }),
              figureOf(rounds, { id: 'resync.restart.afterBootMs', label: 'restart storm: from the server answering again until all are in sync', unit: 'ms', better: 'lower', against: 'sqlite-relay' }),
            ]),
      ],
      correctness: totalCorrectness(rounds),
      notes: [
        `${roundsOf(options)} round(s); the 200 commands are sent at ${MISSED_RATE}/s while half the viewers are away; bytes are the JSON of what the server sends (join answer, events); the storm is not run on the bare relay (it keeps nothing over a restart); viewers reconnect with the board's own delays (0.5 s, at most 3 s); the three systems of a round start side by side before its first run`,
        ...(options.quick ? [`quick: ${many(VIEWERS)} viewers (${many(DROPPED)} drop) instead of 1,000, one round, no restart storm`] : []),
        ...rounds.notes,
      ],
    };
    return result;
  } finally {
    await swarm.close();
  }
};

export default resync;
