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
    const record = buildRecord(liveLog().events, { finalHash: HASH, defaultTimeZone: 'UTC', qualificationsOf: { [people.sue.userId]: ['supervisor', 'signaller'] }, inspectors: [people.rita.userId] });
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
    expect(buildRecord(liveLog().events, { finalHash: HASH, defaultTimeZone: 'UTC' }).crew.map((c) => c.mayInspect)).toEqual([null, null, null, null]);
    expect(record.job).toMatchObject({ name: 'Yard trial', site: 'Pad 3', kind: 'erection', craneFleetNumber: 'TC-1' });
    expect(record.finalHash).toBe(HASH);
    expect(record.lastSeq).toBe(liveLog().events.length);
  });

  it('keeps every acknowledgment of a hold, the withdrawal between them, and its release', () => {
    const record = buildRecord(liveLog().events, { finalHash: HASH, defaultTimeZone: 'UTC' });
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
    const record = buildRecord(liveLog().events, { finalHash: HASH, defaultTimeZone: 'UTC' });
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
    const record = buildRecord(liveLog().events, { finalHash: HASH, defaultTimeZone: 'UTC' });
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
    const record = buildRecord(liveLog().events, { finalHash: HASH, defaultTimeZone: 'UTC' });
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
    const fromLog = buildRecord(liveLog().events, { finalHash: HASH, defaultTimeZone: 'UTC' });
    expect(fromLog.configuration).toMatchObject({ figuresFrom: 'log' });
    expect(fromLog.configuration!.figures[0]).toMatchObject({ key: 'chart.lift', value: '81 %', rule: null });
    expect(fromLog.configuration!.configuration.boomLengthM).toBe(24);
    const figure: Figure = { key: 'chart.lift', group: 'boom', label: 'Share of the chart', value: '81 %', status: 'caution', overridable: true, rule: 'load ÷ chart capacity at the next longer radius (invented test rule)' };
    const computed = buildRecord(liveLog().events, { finalHash: HASH, defaultTimeZone: 'UTC', figures: [figure] });
    expect(computed.configuration).toMatchObject({ figuresFrom: 'computed' });
    expect(computed.configuration!.figures[0]).toMatchObject({ label: 'Share of the chart', rule: 'load ÷ chart capacity at the next longer radius (invented test rule)', detail: null });
  });

  it('is in progress until the log ends the job, and finds the final sign-off the plan marks', () => {
    const log = liveLog();
    const live = buildRecord(log.events, { finalHash: HASH, defaultTimeZone: 'UTC' });
    expect(live.status).toBe('in_progress');
    expect(live.dates.finished).toBeNull();
    expect(live.signOff).toMatchObject({ stageTitle: 'Stage lift-boom', hold: { title: 'Inspected and handed over', released: null } });

    log.next('hold.acknowledged', { stageId: 'lift-boom', holdId: 'lift.signoff', role: 'rigger', photoId: null, values: null }, { by: people.rita });
    const release = log.next('hold.released', { stageId: 'lift-boom', holdId: 'lift.signoff' }, { by: people.sue });
    // The writer adds the effects to the stored event; here they are added the same way.
    log.events[log.events.length - 1] = parseJobEvent({ ...release, data: { ...release.data, effects: { job: { state: 'complete' } } } });
    const done = buildRecord(log.events, { finalHash: HASH, defaultTimeZone: 'UTC' });
    // The ending may be recorded as an effect of the release rather than as its own event.
    expect(done.status).toBe('complete');
    expect(done.dates.finished).toBe(log.events.at(-1)!.at);
    expect(done.signOff!.hold.entries.map((e) => e.name)).toEqual(['Rita Venn']);
    expect(done.signOff!.hold.released?.name).toBe('Sue Marsh');

    const older = eventLog();
    older.next('job.created', { job: { name: 'Old job', site: 'Yard', kind: 'erection' }, craneFleetNumber: 'TC-2', crew: [] });
    older.next('job.ready', { planVersion: 1, plan: smallPlan() });
    older.next('job.completed', {});
    const old = buildRecord(older.events, { finalHash: HASH, defaultTimeZone: 'UTC' });
    expect(old.status).toBe('complete');
    // A plan written before the job had an ending has no sign-off: none is made up.
    expect(old.signOff).toBeNull();
  });

  it('words every event of the log once, in order', () => {
    const log = liveLog();
    const record = buildRecord([...log.events].reverse(), { finalHash: HASH, defaultTimeZone: 'UTC' });
    expect(record.timeline.map((t) => t.seq)).toEqual(log.events.map((e) => e.seq));
    expect(record.timeline[0].sentence).toBe('Job created: Yard trial at Pad 3 (erection)');
    expect(record.timeline.find((t) => t.seq === 23)!.sentence).toBe('Recorded the wind: mean 12 m/s, gust 17 m/s at 10 m. Also reported: ice. Over the limit: gust 17 m/s over 13 m/s.');
  });
});

/**
 * Two shifts of the small plan at a site in another zone: a crew change with a replacement that
 * takes a hold acknowledgment back, the end of shift 1 with its make-safe checklist, the handover
 * to a second supervisor, the start-of-shift hold (an acknowledgment taken back by a disabled
 * account), shift 2 and an administrator's transfer of the acting supervisor.
 */
function twoShiftLog() {
  const log = eventLog();
  const { sue, otto, rita, sam, ned, ola } = people;
  log.next('job.created', { job: { name: 'Two-shift trial', site: 'Wharf 4', kind: 'erection', timeZone: 'Pacific/Auckland' }, craneFleetNumber: 'TC-3', crew: [] });
  log.next('crew.set', {
    crew: [
      { userId: sue.userId, name: sue.name, role: 'supervisor' },
      { userId: otto.userId, name: otto.name, role: 'operator' },
      { userId: rita.userId, name: rita.name, role: 'rigger' },
      { userId: sam.userId, name: sam.name, role: 'signaller' },
    ],
  });
  log.next('job.ready', { planVersion: 1, plan: smallPlan() });
  for (const who of [sue, otto, rita, sam]) log.next('briefing.acknowledged', { planVersion: 1 }, { by: who });
  log.next('job.started', {}, { by: sue }); // seq 8
  log.next('step.completed', { stageId: 'ground', stepId: 'ground.slope', value: '0.5', photoId: null }, { by: rita });
  log.next('step.completed', { stageId: 'ground', stepId: 'ground.mats', value: null, photoId: null }, { by: rita });
  log.next('step.completed', { stageId: 'ground', stepId: 'ground.photo', value: null, photoId: 'photo-9' }, { by: rita });
  log.next('hold.acknowledged', { stageId: 'ground', holdId: 'ground.hold', role: 'rigger' }, { by: rita }); // 12
  log.next('crew.set', {
    crew: [
      { userId: sue.userId, name: sue.name, role: 'supervisor' },
      { userId: otto.userId, name: otto.name, role: 'operator' },
      { userId: sam.userId, name: sam.name, role: 'signaller' },
      { userId: sam.userId, name: sam.name, role: 'rigger' },
      { userId: ned.userId, name: ned.name, role: 'supervisor' },
      { userId: ola.userId, name: ola.name, role: 'operator' },
    ],
    added: [
      { userId: sam.userId, role: 'rigger' },
      { userId: ned.userId, role: 'supervisor' },
      { userId: ola.userId, role: 'operator' },
    ],
    removed: [{ userId: rita.userId, role: 'rigger' }],
    withdrawn: [{ stageId: 'ground', holdId: 'ground.hold', userId: rita.userId, name: rita.name, role: 'rigger' }],
  }); // 13
  log.next('hold.acknowledged', { stageId: 'ground', holdId: 'ground.hold', role: 'rigger' }, { by: sam });
  log.next('hold.acknowledged', { stageId: 'ground', holdId: 'ground.hold', role: 'operator' }, { by: otto });
  log.next('hold.released', { stageId: 'ground', holdId: 'ground.hold' }, { by: sue }); // 16
  log.next('shift.ending', {
    shift: 1,
    workPhase: 'boom-on-ground',
    items: [
      { id: 'blocking', text: 'Sections on blocking.', roles: ['rigger', 'supervisor'], asksNote: false },
      { id: 'keyHeld', text: 'Key with the supervisor: say where.', roles: ['supervisor'], asksNote: true },
    ],
  }, { by: sue }); // 17
  log.next('shift.item.done', { itemId: 'blocking', role: 'rigger', note: null, madeSafe: false }, { by: sam }); // 18
  log.next('shift.item.done', { itemId: 'keyHeld', role: 'supervisor', note: 'In the site office safe.', madeSafe: true }, { by: sue }); // 19
  log.next('handover.written', {
    shift: 1,
    to: { userId: ned.userId, name: ned.name },
    done: ['Stage ground'],
    open: ['Stage assemble: 1 of 1 steps to do'],
    defects: [],
    overrides: [],
    hazards: 'Frost forecast overnight: check the mats before any travel.',
    note: 'Assist crane booked for 07:00.',
  }, { by: sue }); // 20
  log.next('handover.acknowledged', { handoverSeq: 20, from: { userId: sue.userId, name: sue.name } }, { by: ned }); // 21
  for (const who of [ned, sam, otto, ola]) log.next('briefing.acknowledged', { planVersion: 1, shift: 2 }, { by: who }); // 22-25
  log.next('shift.inspected', { shift: 2, note: 'Mats, blocking and pins checked: no change overnight.' }, { by: sam }); // 26
  log.next('shift.start.acknowledged', { shift: 2, role: 'operator' }, { by: otto }); // 27
  log.next('crew.member.disabled', { userId: otto.userId, name: otto.name, withdrawn: [{ stageId: null, holdId: 'shift-start', userId: otto.userId, name: otto.name, role: 'operator' }] }, { by: sue }); // 28
  log.next('shift.start.acknowledged', { shift: 2, role: 'operator' }, { by: ola }); // 29
  log.next('shift.start.acknowledged', { shift: 2, role: 'supervisor' }, { by: ned }); // 30
  log.next('weather.recorded', { reading: { meanMs: 3, gustMs: 5, heightM: 10, lightning: false, poorVisibility: false, ice: false }, stop: null }, { by: sam }); // 31
  log.next('shift.started', { shift: 2 }, { by: ned }); // 32
  const transfer = log.next('acting.transferred', { from: { userId: ned.userId, name: ned.name }, to: { userId: sue.userId, name: sue.name }, reason: 'Ned Orr taken ill and off site.' }); // 33
  // An administrator does this; the log's envelope says so.
  log.events[log.events.length - 1] = parseJobEvent({ ...transfer, by: { userId: 'u-ada', name: 'Ada Quill', role: 'admin' } });
  return log;
}

describe('buildRecord: shifts', () => {
  const ctx = { finalHash: HASH, defaultTimeZone: 'Europe/Lisbon' };

  it('carries the job’s own time zone, or the caller’s default for a job that names none', () => {
    expect(buildRecord(twoShiftLog().events, ctx)).toMatchObject({ timeZone: 'Pacific/Auckland', timeZoneFrom: 'job' });
    expect(buildRecord(liveLog().events, ctx)).toMatchObject({ timeZone: 'Europe/Lisbon', timeZoneFrom: 'default' });
    const moved = twoShiftLog();
    moved.next('job.updated', { changes: { timeZone: 'Australia/Perth' } });
    expect(buildRecord(moved.events, ctx).timeZone).toBe('Australia/Perth');
  });

  it('gives each shift its start, its briefings, its end with every make-safe item, and the handover note in full', () => {
    const record = buildRecord(twoShiftLog().events, ctx);
    expect(record.shifts.map((s) => s.number)).toEqual([1, 2]);
    const [first, second] = record.shifts;

    expect(first.started).toMatchObject({ seq: 8, name: 'Sue Marsh', sentence: 'Started the job on the board.' });
    expect(first.startHold).toEqual([]);
    expect(first.briefed.map((b) => `${b.name} v${b.planVersion}`)).toEqual(['Sue Marsh v1', 'Otto Brand v1', 'Rita Venn v1', 'Sam Pike v1']);
    expect(first.end).toMatchObject({ ended: { seq: 17, name: 'Sue Marsh' }, workPhase: 'boom-on-ground', workPhaseWords: 'boom being assembled on the ground' });
    expect(first.end!.items.map((i) => [i.id, i.text, i.done?.name, i.done?.role, i.done?.note, i.done?.seq])).toEqual([
      ['blocking', 'Sections on blocking.', 'Sam Pike', 'rigger', null, 18],
      ['keyHeld', 'Key with the supervisor: say where.', 'Sue Marsh', 'supervisor', 'In the site office safe.', 19],
    ]);
    expect(first.end!.madeSafe).toMatchObject({ seq: 19, name: 'Sue Marsh' });
    expect(first.end!.madeSafe!.sentence).toMatch(/Every item done: the job is MADE SAFE\.$/);

    expect(first.handovers).toHaveLength(1);
    expect(record.handovers).toEqual(first.handovers);
    expect(first.handovers[0]).toMatchObject({
      written: { seq: 20, name: 'Sue Marsh' },
      shift: 1,
      to: { name: 'Ned Orr' },
      done: ['Stage ground'],
      open: ['Stage assemble: 1 of 1 steps to do'],
      hazards: 'Frost forecast overnight: check the mats before any travel.',
      note: 'Assist crane booked for 07:00.',
      acknowledged: { seq: 21, name: 'Ned Orr' },
    });

    expect(second.started).toMatchObject({ seq: 32, name: 'Ned Orr', sentence: 'Released the start-of-shift hold: shift 2 is under way.' });
    expect(second.startHold.map((g) => [g.kind, g.name, g.note, g.takenBack?.seq ?? null])).toEqual([
      ['inspection', 'Sam Pike', 'Mats, blocking and pins checked: no change overnight.', null],
      ['operator', 'Otto Brand', null, 28],
      ['operator', 'Ola Hart', null, null],
      ['supervisor', 'Ned Orr', null, null],
    ]);
    expect(second.briefed.map((b) => b.name)).toEqual(['Ned Orr', 'Sam Pike', 'Otto Brand', 'Ola Hart']);
    expect(second.end).toBeNull();
    expect(record.shiftNow).toEqual({ number: 2, phase: 'working' });
  });

  it('shows a shift part-way through making safe: the items not ticked, not made safe', () => {
    const log = twoShiftLog();
    const record = buildRecord(log.events.slice(0, 18), ctx);
    const end = record.shifts[0].end!;
    expect(end.items.map((i) => i.done?.name ?? null)).toEqual(['Sam Pike', null]);
    expect(end.madeSafe).toBeNull();
    expect(record.shiftNow).toEqual({ number: 1, phase: 'making_safe' });
    // Made safe, not yet handed over: the note waits unread and shift 2 has not begun.
    const safe = buildRecord(log.events.slice(0, 20), ctx);
    expect(safe.shiftNow).toEqual({ number: 1, phase: 'made_safe' });
    expect(safe.handovers[0].acknowledged).toBeNull();
    expect(safe.actingSupervisor).toMatchObject({ name: 'Sue Marsh' });
    // The next shift is listed, waiting for its start-of-shift hold.
    expect(safe.shifts.map((s) => [s.number, s.started, s.startHold.length])).toEqual([
      [1, expect.objectContaining({ seq: 8 }), 0],
      [2, null, 0],
    ]);
  });

  it('lists who was acting supervisor: from the job’s start, by the handover, and by an administrator with the reason', () => {
    const record = buildRecord(twoShiftLog().events, ctx);
    expect(record.actingChanges.map((c) => [c.how, c.from?.name ?? null, c.to.name, c.reason, c.entry.seq, c.entry.role])).toEqual([
      ['job_start', null, 'Sue Marsh', null, 8, 'supervisor'],
      ['handover', 'Sue Marsh', 'Ned Orr', null, 21, 'supervisor'],
      ['admin_transfer', 'Ned Orr', 'Sue Marsh', 'Ned Orr taken ill and off site.', 33, 'admin'],
    ]);
    expect(record.actingSupervisor).toMatchObject({ userId: people.sue.userId, name: 'Sue Marsh', since: minutes(33) });
  });

  it('lists crew changes after the start and disabled accounts with the acknowledgments they took back, also on the hold', () => {
    const record = buildRecord(twoShiftLog().events, ctx);
    // The planning crew (seq 2) is not a change during the job.
    expect(record.crewChanges.map((c) => [c.kind, c.entry.seq])).toEqual([
      ['crew_changed', 13],
      ['account_disabled', 28],
    ]);
    const [change, disabled] = record.crewChanges;
    expect(change.added.map((m) => `${m.name} ${m.role}`)).toEqual(['Sam Pike rigger', 'Ned Orr supervisor', 'Ola Hart operator']);
    expect(change.removed.map((m) => `${m.name} ${m.role}`)).toEqual(['Rita Venn rigger']);
    expect(change.takenBack).toEqual([{ userId: people.rita.userId, name: 'Rita Venn', role: 'rigger', hold: 'Ground ready' }]);
    expect(change.disabled).toBeNull();
    expect(disabled.disabled).toEqual({ userId: people.otto.userId, name: 'Otto Brand' });
    expect(disabled.takenBack).toEqual([{ userId: people.otto.userId, name: 'Otto Brand', role: 'operator', hold: 'the start-of-shift hold' }]);
    expect(disabled.entry.sentence).toBe('Otto Brand’s account was disabled. Their acknowledgments were taken back: Otto Brand as operator at “the start-of-shift hold”.');

    const ground = record.stages.find((s) => s.id === 'ground')!.hold!;
    expect(ground.entries.map((e) => `${e.kind} ${e.name} ${e.role} ${e.seq}`)).toEqual([
      'acknowledged Rita Venn rigger 12',
      'taken_back Rita Venn rigger 13',
      'acknowledged Sam Pike rigger 14',
      'acknowledged Otto Brand operator 15',
    ]);
    expect(ground.entries[1].sentence).toContain('Acknowledgments taken back with them, so those holds are open again: Rita Venn as rigger at “Ground ready”.');
    expect(ground.released).toMatchObject({ seq: 16, name: 'Sue Marsh' });
  });

  it('still gives the record of a log the board’s reducer cannot follow, leaving only the shift now and acting supervisor unknown', () => {
    const log = eventLog();
    log.next('job.created', { job: { name: 'Odd log', site: 'Yard', kind: 'erection' }, craneFleetNumber: 'TC-4', crew: [] });
    // An item with no shift ending before it: the reducer refuses it.
    log.next('shift.item.done', { itemId: 'blocking', role: 'rigger', note: null, madeSafe: false }, { by: people.rita });
    const record = buildRecord(log.events, ctx);
    expect(record.shiftNow).toBeNull();
    expect(record.actingSupervisor).toBeNull();
    expect(record.shifts).toEqual([]);
    expect(record.timeline).toHaveLength(2);
  });
});
