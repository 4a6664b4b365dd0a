// The record model read from a hand-written log (tests/shared/board/events.ts, parsed by the log's
// own schema). Expected sentences are written out here, so a change in the wording or in what the
// record picks up from the log shows as a failure.
import { describe, expect, it } from 'vitest';
import { parseJobEvent } from '../../../shared/events/log.js';
import { buildRecord } from '../../../shared/record/record.js';
import type { Plan } from '../../../shared/schemas/plan.js';
import type { Figure } from '../../../shared/schemas/configuration.js';
import { eventLog, minutes, people } from '../board/events.js';
import { planStep, smallPlan } from '../board/board-plan.js';
import { config } from '../plan/plan-fixtures.js';

const HASH = 'ab'.repeat(32);

/** The small plan with a final sign-off hold on its last stage. */
function planWithSignOff(): Plan {
  const plan = smallPlan();
  const last = plan.stages.at(-1)!;
  last.hold = { id: 'lift.signoff', title: 'Inspected and handed over', instruction: 'Inspect and hand over.', requiredRoles: ['rigger'], releasingRole: 'supervisor', mandatory: true, valueCheck: null, signOff: true };
  return plan;
}

function liveLog(plan: Plan = planWithSignOff()) {
  const log = eventLog();
  const { sue, otto, rita, sam } = people;
  log.next('job.created', { job: { name: 'Yard trial', site: 'Pad 3', kind: 'erection' }, craneFleetNumber: 'TC-1', crew: [] });
  log.next('crew.set', {
    crew: [
      { userId: sue.userId, name: sue.name, role: 'supervisor' },
      { userId: otto.userId, name: otto.name, role: 'operator' },
      { userId: rita.userId, name: rita.name, role: 'rigger' },
      { userId: sam.userId, name: sam.name, role: 'signaller' },
      { userId: sue.userId, name: sue.name, role: 'signaller' },
    ],
    added: [{ userId: otto.userId, role: 'operator' }],
    removed: [],
  });
  log.next('configuration.set', { windLimits: null, configuration: config({ boomLengthM: 24 }), figures: [{ key: 'chart.lift', value: '81 %', status: 'caution', overridable: true }] });
  log.next('override.requested', { override: { id: 'ov-1', figureKey: 'chart.lift', figureLabel: 'Share of the chart', figureValue: '81 %', reason: 'Test weights are certified and the radius is fixed.' } });
  log.next('override.approved', { overrideId: 'ov-1', figureKey: 'chart.lift' });
  log.next('job.ready', { planVersion: 1, plan });
  log.next('job.started', {});
  log.next('briefing.acknowledged', { planVersion: 1 }, { by: rita });
  log.next('step.completed', { stageId: 'ground', stepId: 'ground.slope', value: '2', photoId: null, outOfLimit: { reason: 'Reading 2 %, above the limit of 1 %.', kind: 'max', value: '2', valueNumber: 2, planned: null, tolerance: null, limit: 1, unit: '%', source: 'test crane data' } }, { by: rita });
  log.next('step.reopened', { stageId: 'ground', stepId: 'ground.slope', alsoReopened: [] });
  log.next('step.completed', { stageId: 'ground', stepId: 'ground.slope', value: '0.5', photoId: null }, { by: rita });
  log.next('step.completed', { stageId: 'ground', stepId: 'ground.mats', value: null, photoId: null }, { by: rita });
  log.next('step.completed', { stageId: 'ground', stepId: 'ground.photo', value: null, photoId: 'photo-1' }, { by: rita });
  log.next('hold.acknowledged', { stageId: 'ground', holdId: 'ground.hold', role: 'rigger', photoId: null, values: null }, { by: rita });
  log.next('hold.acknowledged', { stageId: 'ground', holdId: 'ground.hold', role: 'operator', photoId: 'photo-1', values: null }, { by: otto });
  log.next('hold.withdrawn', { stageId: 'ground', holdId: 'ground.hold', role: 'operator' }, { by: otto });
  log.next('hold.acknowledged', { stageId: 'ground', holdId: 'ground.hold', role: 'operator', photoId: null, values: null }, { by: otto });
  log.next('hold.released', { stageId: 'ground', holdId: 'ground.hold' }, { by: sue });
  log.next('job.stopped', { reason: null, pressedAt: minutes(19) }, { by: sam });
  log.next('job.stopped', { reason: 'Same stop', pressedAt: minutes(20), alreadyStopped: true }, { by: rita });
  log.next('job.stop.noted', { reason: 'Person in the fall zone.' }, { by: sam });
  log.next('job.resumed', { reason: 'Fall zone cleared and barriered.' }, { by: sue });
  log.next('weather.recorded', {
    reading: { meanMs: 12, gustMs: 17, heightM: 10, lightning: false, poorVisibility: false, ice: true },
    phase: 'raising',
    limit: { meanMs: 9, gustMs: 13 },
    stop: { reason: 'Gust 17 m/s over the raising limit of 13 m/s.' },
    overLimit: 'gust 17 m/s over 13 m/s',
  }, { by: sam });
  log.next('defect.reported', { defectId: 'd-1', componentId: null, serial: 'S-204', stageId: 'ground', description: 'Cracked lacing on the base section.', photoId: 'photo-2' }, { by: rita });
  const revised = structuredClone(plan);
  revised.stages[1].steps.push(planStep('assemble.extra', 'Check the lacing on the replacement section'));
  log.next('plan.revised', { planVersion: 2, plan: revised, reason: 'Base section replaced after the defect.' });
  log.next('briefing.acknowledged', { planVersion: 2 }, { by: otto });
  log.next('briefing.acknowledged', { planVersion: 2 }, { by: rita });
  return log;
}

describe('buildRecord', () => {
  it('lists the crew once each, with every role and the qualifications the caller passed', () => {
    const record = buildRecord(liveLog().events, { finalHash: HASH, qualificationsOf: { [people.sue.userId]: ['supervisor', 'signaller'] }, inspectors: [people.rita.userId] });
    expect(record.crew.map((c) => [c.name, c.roles.join('+')])).toEqual([
      ['Sue Marsh', 'supervisor+signaller'],
      ['Otto Brand', 'operator'],
      ['Rita Venn', 'rigger'],
      ['Sam Pike', 'signaller'],
    ]);
    expect(record.crew[0].qualifications).toEqual(['supervisor', 'signaller']);
    // Not passed: unknown, never an empty list that would read as "holds nothing".
    expect(record.crew[1].qualifications).toBeNull();
    expect(record.crew.map((c) => c.mayInspect)).toEqual([false, false, true, false]);
    // Not told who may inspect: unknown for everyone, never "nobody".
    expect(buildRecord(liveLog().events, { finalHash: HASH }).crew.map((c) => c.mayInspect)).toEqual([null, null, null, null]);
    expect(record.job).toMatchObject({ name: 'Yard trial', site: 'Pad 3', kind: 'erection', craneFleetNumber: 'TC-1' });
    expect(record.finalHash).toBe(HASH);
    expect(record.lastSeq).toBe(liveLog().events.length);
  });

  it('keeps every acknowledgment of a hold, the withdrawal between them, and its release', () => {
    const record = buildRecord(liveLog().events, { finalHash: HASH });
    const ground = record.stages.find((s) => s.id === 'ground')!;
    expect(ground.hold!.entries.map((e) => `${e.kind} ${e.name} ${e.role}`)).toEqual([
      'acknowledged Rita Venn rigger',
      'acknowledged Otto Brand operator',
      'withdrawn Otto Brand operator',
      'acknowledged Otto Brand operator',
    ]);
    expect(ground.hold!.entries[0].sentence).toBe('Acknowledged the hold point “Ground ready” as rigger.');
    expect(ground.hold!.released).toMatchObject({ name: 'Sue Marsh', at: minutes(18), sentence: 'Released the hold point “Ground ready”.' });
    // A hold nobody has reached yet is listed, empty and not released.
    const ready = record.stages.find((s) => s.id === 'ready-boom')!;
    expect(ready.hold).toMatchObject({ title: 'Ready to raise', entries: [], released: null, requiredRoles: ['operator', 'signaller'] });
  });

  it('keeps a step recorded out of limit, its reopening and the value that replaced it', () => {
    const record = buildRecord(liveLog().events, { finalHash: HASH });
    const slope = record.stages.find((s) => s.id === 'ground')!.steps.find((s) => s.id === 'ground.slope')!;
    expect(slope.history.map((h) => [h.kind, h.value, h.outOfLimit])).toEqual([
      ['done', '2', 'Reading 2 %, above the limit of 1 %.'],
      ['reopened', null, null],
      ['done', '0.5', null],
    ]);
    expect(slope.done).toBe(true);
    expect(slope.history[0].sentence).toBe('Marked done: Measure the slope under the tracks. Recorded reading 2 %. OUT OF LIMIT: Reading 2 %, above the limit of 1 %.');
    // Photos each once, in the order the log first names them.
    expect(record.photoIds).toEqual(['photo-1', 'photo-2']);
  });

  it('pairs each stop with everyone who pressed it, its cause and its resume; a weather stop stays open', () => {
    const record = buildRecord(liveLog().events, { finalHash: HASH });
    expect(record.stops).toHaveLength(2);
    const [press, wind] = record.stops;
    expect(press.pressed.name).toBe('Sam Pike');
    expect(press.alsoPressed.map((p) => p.name)).toEqual(['Rita Venn']);
    expect(press.causes.map((c) => c.reason)).toEqual(['Person in the fall zone.']);
    expect(press.resumed).toMatchObject({ name: 'Sue Marsh', reason: 'Fall zone cleared and barriered.' });
    expect(wind).toMatchObject({ byWeather: true, resumed: null });
    expect(wind.pressed.reason).toBe('Gust 17 m/s over the raising limit of 13 m/s.');
    expect(record.weather[0]).toMatchObject({ meanMs: 12, gustMs: 17, heightM: 10, flags: ['ice'], overLimit: 'gust 17 m/s over 13 m/s' });
  });

  it('lists overrides with reasons, defects, and each plan version with its briefings', () => {
    const record = buildRecord(liveLog().events, { finalHash: HASH });
    expect(record.overrides).toHaveLength(1);
    expect(record.overrides[0]).toMatchObject({ figureLabel: 'Share of the chart', reason: 'Test weights are certified and the radius is fixed.', withdrawn: null });
    expect(record.overrides[0].approved?.name).toBe('Sue Marsh');
    expect(record.defects[0]).toMatchObject({ serial: 'S-204', stageTitle: 'Stage ground', photoId: 'photo-2' });
    expect(record.revisions.map((r) => [r.version, r.reason, r.briefings.map((b) => b.name)])).toEqual([
      [1, null, ['Rita Venn']],
      [2, 'Base section replaced after the defect.', ['Otto Brand', 'Rita Venn']],
    ]);
    // The revision's added step is in the stage, and what was recorded before it is kept.
    const assemble = record.stages.find((s) => s.id === 'assemble')!;
    expect(assemble.steps.map((s) => s.id)).toEqual(['assemble.pins', 'assemble.extra']);
    expect(record.stages.find((s) => s.id === 'ground')!.hold!.entries).toHaveLength(4);
  });

  it('takes the figures with their rules from the caller, and says when only the log’s copy was there', () => {
    const fromLog = buildRecord(liveLog().events, { finalHash: HASH });
    expect(fromLog.configuration).toMatchObject({ figuresFrom: 'log' });
    expect(fromLog.configuration!.figures[0]).toMatchObject({ key: 'chart.lift', value: '81 %', rule: null });
    expect(fromLog.configuration!.configuration.boomLengthM).toBe(24);
    const figure: Figure = { key: 'chart.lift', group: 'boom', label: 'Share of the chart', value: '81 %', status: 'caution', overridable: true, rule: 'load ÷ chart capacity at the next longer radius (invented test rule)' };
    const computed = buildRecord(liveLog().events, { finalHash: HASH, figures: [figure] });
    expect(computed.configuration).toMatchObject({ figuresFrom: 'computed' });
    expect(computed.configuration!.figures[0]).toMatchObject({ label: 'Share of the chart', rule: 'load ÷ chart capacity at the next longer radius (invented test rule)', detail: null });
  });

  it('is in progress until the log ends the job, and finds the final sign-off the plan marks', () => {
    const log = liveLog();
    const live = buildRecord(log.events, { finalHash: HASH });
    expect(live.status).toBe('in_progress');
    expect(live.dates.finished).toBeNull();
    expect(live.signOff).toMatchObject({ stageTitle: 'Stage lift-boom', hold: { title: 'Inspected and handed over', released: null } });

    log.next('hold.acknowledged', { stageId: 'lift-boom', holdId: 'lift.signoff', role: 'rigger', photoId: null, values: null }, { by: people.rita });
    const release = log.next('hold.released', { stageId: 'lift-boom', holdId: 'lift.signoff' }, { by: people.sue });
    // The writer adds the effects to the stored event; here they are added the same way.
    log.events[log.events.length - 1] = parseJobEvent({ ...release, data: { ...release.data, effects: { job: { state: 'complete' } } } });
    const done = buildRecord(log.events, { finalHash: HASH });
    // The ending may be recorded as an effect of the release rather than as its own event.
    expect(done.status).toBe('complete');
    expect(done.dates.finished).toBe(log.events.at(-1)!.at);
    expect(done.signOff!.hold.entries.map((e) => e.name)).toEqual(['Rita Venn']);
    expect(done.signOff!.hold.released?.name).toBe('Sue Marsh');

    const older = eventLog();
    older.next('job.created', { job: { name: 'Old job', site: 'Yard', kind: 'erection' }, craneFleetNumber: 'TC-2', crew: [] });
    older.next('job.ready', { planVersion: 1, plan: smallPlan() });
    older.next('job.completed', {});
    const old = buildRecord(older.events, { finalHash: HASH });
    expect(old.status).toBe('complete');
    // A plan written before the job had an ending has no sign-off: none is made up.
    expect(old.signOff).toBeNull();
  });

  it('words every event of the log once, in order', () => {
    const log = liveLog();
    const record = buildRecord([...log.events].reverse(), { finalHash: HASH });
    expect(record.timeline.map((t) => t.seq)).toEqual(log.events.map((e) => e.seq));
    expect(record.timeline[0].sentence).toBe('Job created: Yard trial at Pad 3 (erection)');
    expect(record.timeline.find((t) => t.seq === 23)!.sentence).toBe('Recorded the wind: mean 12 m/s, gust 17 m/s at 10 m. Also reported: ice. Over the limit: gust 17 m/s over 13 m/s.');
  });
});
