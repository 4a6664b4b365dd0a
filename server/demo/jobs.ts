import type { Configuration } from '../../shared/schemas/configuration.js';
import type { CommsPlan } from '../../shared/schemas/jobs.js';
import { utcOffset } from '../../shared/time.js';
import type { AppContext } from '../context.js';
import { createJob, setConfiguration, setCrew, updateJob } from '../commands/jobs.js';
import { makeReady } from '../commands/plans.js';
import type { User } from '../entities/User.js';
import { DemoBoardDriver } from './board-driver.js';
import type { DemoFleet } from './fleet.js';

export interface DemoPeople {
  admin: User;
  supervisor: User;
  supervisor2: User;
  operator: User;
  signaller: User;
  rigger: User;
  rigger2: User;
  viewer: User;
}

const ground = (kpa: number, reference: string): Configuration['ground'] => ({
  groundType: 'medium dense sand and gravel',
  allowablePressureKpa: kpa,
  source: { kind: 'ground_investigation', reference, designer: '' },
});

/** The second unit as both of its demo jobs build it: a 21 m boom, four parts on the 45 t block, no mats, no assist crane. */
function secondUnitConfiguration(fleet: DemoFleet): Configuration {
  const lift = liftConfiguration(fleet);
  return {
    ...lift,
    craneUnitId: fleet.secondUnitId,
    boomLengthM: 21,
    mainHook: { hookBlockId: 'HB45', parts: 4, lowestHookPositionM: 0 },
    mats: { ...lift.mats, used: false },
    assist: { ...lift.assist, assistCraneId: null, chartId: null, lifts: [] },
  };
}

function liftConfiguration(fleet: DemoFleet): Configuration {
  return {
    craneUnitId: fleet.unitId,
    boomLengthM: 60,
    mainHook: { hookBlockId: 'HB120', parts: 6, lowestHookPositionM: 0 },
    auxiliary: { enabled: false, hookBlockId: null },
    heaviestLoad: { description: 'Transformer T2 (45 t) on its lifting beam', loadT: 45, riggingT: 1.6, radiusM: 14 },
    ground: ground(300, 'Harrowmere GI report GI-0142 rev B'),
    mats: { used: true, lengthM: 6, widthM: 1.5, thicknessM: 0.3, weightKg: 2400 },
    assist: {
      assistCraneId: fleet.assistCraneId,
      chartId: 'boom-11.6m-full-cw',
      // Everything on the assist crane's hook counts against its chart: its own 0.6 t hook block,
      // the slings and the shackles (invented weights).
      lifts: [
        {
          label: 'Boom base onto blocking',
          liftT: 7.8,
          riggingT: 0,
          radiusM: 6,
          hookBlockT: 0.6,
          slingsT: 0.2,
          shacklesT: 0.1,
          deductionsT: 0,
          // The base's centre of gravity is 3.4 m from its foot: lugs at 1.0 m and 6.5 m, hook 4 m above them.
          legs: { toCogAM: 2.4, toCogBM: 3.1, hookHeightM: 4, legRatedLoadT: 8 },
        },
        { label: '12 m inserts, one at a time', liftT: 3.5, riggingT: 0, radiusM: 8, hookBlockT: 0.6, slingsT: 0.15, shacklesT: 0.05, deductionsT: 0, legs: null },
        { label: 'Boom tip', liftT: 4.1, riggingT: 0, radiusM: 7, hookBlockT: 0.6, slingsT: 0.15, shacklesT: 0.05, deductionsT: 0, legs: null },
      ],
      // Largest outrigger load over these lifts from the assist crane's outrigger-load table, on 1.2 m timber pads.
      pads: { kind: 'outrigger', loadT: 26, lengthM: 1.2, widthM: 1.2, weightKg: 250 },
      // The 60 m boom needs no tip support while it is raised: no tandem.
      tandem: { alongFromTipM: null, sideM: null, releaseAngleDeg: null, hookBlockT: 0, slingsT: 0, shacklesT: 0, deductionsT: 0 },
    },
    siteHazards: {
      // The assist crane works on the boom laydown, west of the crane: 48 m from the line.
      powerLines: [
        { label: '11 kV overhead line, east boundary', voltageKv: 11, distanceM: 82, voltageConfirmedByOwner: false, encroachmentPreventionInPlace: false, assistDistanceM: 48 },
      ],
      buriedServices: 'Earthing grid and cable trench along the north fence: mats bridge the trench, no outrigger or track on its cover slabs.',
      neighbours: 'Public footpath 40 m west: marshal closes it while the boom is raised or lowered.',
      loadAndTagLineAllowanceM: 3,
      swayAllowanceM: 2,
    },
    fallZoneMarginM: 5,
    chartCautionPercent: 75,
    weatherFreshMinutes: 15,
  };
}

function comms(p: DemoPeople, channel: string): CommsPlan {
  return {
    radioChannel: channel,
    callSigns: [
      { userId: p.supervisor.id, callSign: 'Lift One' },
      // She directs the assist crane: every motion's director has a call sign.
      { userId: p.supervisor2.id, callSign: 'Lift Two' },
      { userId: p.operator.id, callSign: 'Crane' },
      { userId: p.signaller.id, callSign: 'Banksman' },
      { userId: p.rigger.id, callSign: 'Rigger One' },
      { userId: p.rigger2.id, callSign: 'Rigger Two' },
    ],
    motionSignallers: [
      { motion: 'boom hoist', userId: p.signaller.id },
      { motion: 'main hoist', userId: p.signaller.id },
      { motion: 'swing', userId: p.signaller.id },
      { motion: 'travel', userId: p.signaller.id },
      { motion: 'assist crane', userId: p.supervisor2.id },
    ],
    fallbackHandSignals: 'Hand signals as in ASME B30.5; the signaller wears the orange vest. Loss of radio: stop at once and wait for hand signals.',
  };
}

const crewOf = (p: DemoPeople) => [
  { userId: p.supervisor.id, role: 'supervisor' as const },
  { userId: p.supervisor2.id, role: 'supervisor' as const },
  { userId: p.supervisor2.id, role: 'signaller' as const },
  { userId: p.operator.id, role: 'operator' as const },
  { userId: p.signaller.id, role: 'signaller' as const },
  { userId: p.rigger.id, role: 'rigger' as const },
  { userId: p.rigger2.id, role: 'rigger' as const },
  { userId: p.viewer.id, role: 'viewer' as const },
];

/** A context whose clock starts at `start` and moves on by `stepMs` at each reading, for history. */
function pastContext(context: AppContext, start: Date, stepMs: number): AppContext {
  let t = start.getTime();
  return { ...context, now: () => new Date((t += stepMs)) };
}

/** The zone's offset from UTC in minutes at that moment, read from the site-time words ("UTC+01:00", "UTC−06:00"). */
function offsetMinutes(atMs: number, zone: string): number {
  const m = /UTC([+\u2212-])(\d\d):(\d\d)/.exec(utcOffset(new Date(atMs), zone));
  if (!m) return 0;
  return (m[1] === '+' ? 1 : -1) * (Number(m[2]) * 60 + Number(m[3]));
}

/**
 * The moment the site's clock reads `hour`:00, `daysBack` days before the latest such morning that
 * is at least `leadMs` before now: "yesterday at 07:00" for the demo, whatever time it is seeded.
 */
function siteMorning(nowMs: number, zone: string, hour: number, daysBack: number, leadMs: number): Date {
  const day = 86_400_000;
  const latest = nowMs - leadMs;
  const local = latest + offsetMinutes(latest, zone) * 60_000;
  let target = Math.floor(local / day) * day + hour * 3_600_000;
  if (target > local) target -= day;
  target -= daysBack * day;
  // Site wall-clock time to UTC, with the offset in force at that moment (summer time included).
  return new Date(target - offsetMinutes(target - offsetMinutes(target, zone) * 60_000, zone) * 60_000);
}

/** A history clock that can also jump forward (never back) to a later time: one job over two shifts. */
function shiftClock(context: AppContext, start: Date, stepMs: number): { context: AppContext; jumpTo: (at: Date) => void } {
  let t = start.getTime();
  return { context: { ...context, now: () => new Date((t += stepMs)) }, jumpTo: (at) => void (t = Math.max(t, at.getTime())) };
}

/**
 * The invented jobs, all made by running the real commands:
 * - a 21 m trial erection on FL-12 at the depot, signed off and complete three days ago;
 * - the 60 m erection on FL-07 for the transformer lift, live, at the guy-line tensioning hold,
 *   acknowledged by the operator and waiting for the signaller;
 * - a 21 m erection on FL-12 at a pumping station over two shifts: begun yesterday morning by Rhys
 *   Calloway, made safe at the end of the day with the boom sections checked and on blocking, handed over to
 *   Marta Lindqvist, and live again in its second shift this morning;
 * - the dismantling of FL-07 after the lift, being planned.
 */
export async function seedDemoJobs(context: AppContext, p: DemoPeople, fleet: DemoFleet): Promise<void> {
  // The completed trial erection, dated three days ago.
  const past = pastContext(context, new Date(context.now().getTime() - 3 * 86_400_000), 90_000);
  const trial = await createJob(past, p.supervisor, { name: 'Depot trial erection, 21 m', site: 'Fenwold depot, yard 2', craneUnitId: fleet.secondUnitId, kind: 'erection' });
  const trialId = trial.job.id;
  // Marta Lindqvist watches the trial of the crane she takes over at the pumping station: on its crew as a
  // viewer, so she reads its record (a job's data is its crew's and the administrators').
  await setCrew(past, p.supervisor, trialId, [...crewOf(p).filter((m) => m.userId !== p.supervisor2.id), { userId: p.supervisor2.id, role: 'viewer' as const }]);
  const depotComms = comms(p, 'Depot channel 2');
  await updateJob(past, p.supervisor, trialId, {
    commsPlan: {
      ...depotComms,
      callSigns: depotComms.callSigns.filter((c) => c.userId !== p.supervisor2.id),
      motionSignallers: depotComms.motionSignallers.filter((m) => m.userId === p.signaller.id),
    },
    distribution: ['records@fenwold-lifting.test'],
  });
  await setConfiguration(past, p.supervisor, trialId, {
    ...secondUnitConfiguration(fleet),
    heaviestLoad: { description: 'Test weights, 12 t', loadT: 12, riggingT: 0.4, radiusM: 9 },
    ground: ground(250, 'Depot slab design note DS-7'),
    siteHazards: { ...liftConfiguration(fleet).siteHazards, powerLines: [], buriedServices: 'None in yard 2.', neighbours: 'Workshop doors kept shut during the raise.' },
  });
  await makeReady(past, p.supervisor, trialId);
  const trialCrew = { supervisor: p.supervisor, operator: p.operator, signaller: p.signaller, rigger: p.rigger };
  const trialDriver = new DemoBoardDriver(past, trialId, trialCrew, { who: p.rigger2, role: 'rigger' });
  await trialDriver.send(p.supervisor, { type: 'job.start' });
  for (const who of [p.supervisor, p.operator, p.signaller, p.rigger, p.rigger2]) await trialDriver.send(who, { type: 'briefing.acknowledge' });
  await trialDriver.send(p.rigger, { type: 'weather.record', meanMs: 4, gustMs: 7, heightM: 10 });
  // The rigger reads the wind again before the boom leaves the ground (a raise needs a fresh reading).
  trialDriver.weatherBy(p.rigger, { meanMs: 4.2, gustMs: 6.8, heightM: 10 });
  // Through to the post-assembly inspection, signed off by the rigger qualified to inspect: its release completes the job.
  await trialDriver.runUntil();

  await seedTwoShiftJob(context, p, fleet);

  // The live erection for the transformer lift, started this morning.
  const morning = pastContext(context, new Date(context.now().getTime() - 4 * 3_600_000), 40_000);
  const lift = await createJob(morning, p.supervisor, { name: 'Transformer T2 lift: boom erection', site: 'Harrowmere substation', craneUnitId: fleet.unitId, kind: 'erection' });
  const liftId = lift.job.id;
  await setCrew(morning, p.supervisor, liftId, crewOf(p));
  await updateJob(morning, p.supervisor, liftId, { commsPlan: comms(p, 'Site channel 4'), distribution: ['records@fenwold-lifting.test', 'site.manager@harrowmere-works.test'] });
  await setConfiguration(morning, p.supervisor, liftId, liftConfiguration(fleet));
  await makeReady(morning, p.supervisor, liftId);
  const liftCrew = { supervisor: p.supervisor, operator: p.operator, signaller: p.signaller, rigger: p.rigger };
  const driver = new DemoBoardDriver(morning, liftId, liftCrew);
  await driver.send(p.supervisor, { type: 'job.start' });
  for (const who of [p.supervisor, p.supervisor2, p.operator, p.signaller, p.rigger, p.rigger2]) await driver.send(who, { type: 'briefing.acknowledge' });
  await driver.send(p.signaller, { type: 'weather.record', meanMs: 5, gustMs: 8, heightM: 10 });
  await driver.runUntil('er-tension');
  await driver.completeSteps('er-tension');
  await driver.acknowledge('er-tension', ['operator']);
  // Fresh readings for the crew arriving now (a resume or a raise needs one from the last 15 minutes).
  await new DemoBoardDriver(context, liftId, liftCrew).send(p.signaller, { type: 'weather.record', meanMs: 4, gustMs: 7, heightM: 10 });

  // The dismantling after the lift, being planned.
  const dismantle = await createJob(context, p.supervisor2, { name: 'Transformer T2 lift: boom dismantling', site: 'Harrowmere substation', craneUnitId: fleet.unitId, kind: 'dismantling' });
  await setCrew(context, p.supervisor2, dismantle.job.id, crewOf(p));
  await updateJob(context, p.supervisor2, dismantle.job.id, { commsPlan: comms(p, 'Site channel 4') });
  await setConfiguration(context, p.supervisor2, dismantle.job.id, liftConfiguration(fleet));
}

/**
 * An erection over two shifts on FL-12 (back from the depot trial): the first shift, yesterday,
 * sets the crane up and checks and lays down the boom sections, and ends with the make-safe
 * checklist and a handover note to
 * Marta Lindqvist; this morning she acknowledges it, the crew is briefed for shift 2, Priya Raman
 * (qualified to inspect) records the shift inspection, the operator and Marta acknowledge the
 * start-of-shift hold, the signaller reads the wind and Marta starts the shift; the boom is
 * being pinned joint by joint now. Every command is the crew's own, so the handover and the made-safe record
 * are genuine events in the log.
 */
async function seedTwoShiftJob(context: AppContext, p: DemoPeople, fleet: DemoFleet): Promise<void> {
  const now = context.now().getTime();
  const zone = 'Europe/London';
  const hour = 3_600_000;
  // Site time: planned the afternoon before, shift 1 from 07:00 to about 16:30 yesterday, shift 2 from 07:00 today
  // (the last 07:00 at least an hour and a half ago, so shift 2 has begun whenever the demo is seeded).
  const clock = shiftClock(context, new Date(siteMorning(now, zone, 7, 2, 1.5 * hour).getTime() + 8 * hour), 45_000);
  const at = clock.context;
  const job = await createJob(at, p.supervisor, {
    name: 'Pump house roof lift: boom erection',
    site: 'Ashcombe Reach pumping station',
    craneUnitId: fleet.secondUnitId,
    kind: 'erection',
    timeZone: zone,
  });
  const jobId = job.job.id;
  const crew = crewOf(p).filter((m) => m.userId !== p.viewer.id);
  await setCrew(at, p.supervisor, jobId, crew);
  const siteComms = comms(p, 'Site channel 1');
  await updateJob(at, p.supervisor, jobId, {
    commsPlan: { ...siteComms, motionSignallers: siteComms.motionSignallers.filter((m) => m.motion !== 'assist crane') },
    distribution: ['records@fenwold-lifting.test', 'works.office@ashcombe-water.test'],
  });
  await setConfiguration(at, p.supervisor, jobId, {
    ...secondUnitConfiguration(fleet),
    heaviestLoad: { description: 'Roof truss pair on its spreader frame (9.5 t)', loadT: 9.5, riggingT: 0.8, radiusM: 10 },
    ground: ground(250, 'Ashcombe Reach hardstanding design note HS-3'),
    siteHazards: {
      ...liftConfiguration(fleet).siteHazards,
      powerLines: [],
      buriedServices: 'Rising main under the access road: the crane tracks stay on the hardstanding, never on the road.',
      neighbours: 'Settling tanks 25 m south: handrails and the walkway closed while the boom is raised.',
    },
  });
  await makeReady(at, p.supervisor, jobId);
  const people = [p.supervisor, p.supervisor2, p.operator, p.signaller, p.rigger, p.rigger2];

  // Shift 1, yesterday: Rhys Calloway is the acting supervisor (he starts the job).
  clock.jumpTo(siteMorning(now, zone, 7, 1, 1.5 * hour));
  const first = new DemoBoardDriver(at, jobId, { supervisor: p.supervisor, operator: p.operator, signaller: p.signaller, rigger: p.rigger });
  await first.send(p.supervisor, { type: 'job.start' });
  for (const who of people) await first.send(who, { type: 'briefing.acknowledge' });
  await first.send(p.signaller, { type: 'weather.record', meanMs: 3.8, gustMs: 6.5, heightM: 10 });
  // Ground, crawlers, mast and counterweight, then every section checked and laid down on blocking; the joints wait for the morning.
  await first.runUntil('er-joints');
  // The end of the day: made safe, then the handover note to the morning's supervisor.
  clock.jumpTo(new Date(siteMorning(now, zone, 7, 1, 1.5 * hour).getTime() + 9.5 * hour));
  await first.makeSafe({
    keyHeld: 'In the key safe of the site cabin; Marta Lindqvist has the code.',
    forecast: 'Overnight: mean 6 m/s, gusts to 11 m/s from the south-west after midnight, easing by morning. Rain; no frost.',
  });
  await first.send(p.supervisor, {
    type: 'handover.write',
    toUserId: p.supervisor2.id,
    hazards:
      'Boom sections laid out on blocking in joint order across the laydown, tip to the south: nobody climbs on them or steps between them. ' +
      'Hardstanding by the east blocking went soft in the afternoon rain; keep the telehandler off it. ' +
      'Gusts forecast overnight: read the wind before anything moves.',
    note:
      'Every section, pin and guy line checked serviceable and its serial recorded; no joint pinned yet. ' +
      'Start with the boom foot: the slings and the backstops come first.',
  });

  // Shift 2, this morning: Marta Lindqvist takes over and starts the shift.
  clock.jumpTo(siteMorning(now, zone, 7, 0, 1.5 * hour));
  const second = new DemoBoardDriver(at, jobId, { supervisor: p.supervisor2, operator: p.operator, signaller: p.signaller, rigger: p.rigger });
  await second.startShift({
    briefed: people,
    inspector: p.rigger2,
    inspectionNote:
      'Walked round the sections, the blocking, the crawlers and the counterweight before work: nothing moved overnight, pins boxed and counted, ' +
      'tracks level on the hardstanding after the rain, key in the cabin safe. Fit to continue.',
    reader: p.signaller,
    reading: { meanMs: 4.1, gustMs: 6.9, heightM: 10 },
  });
  // A little work in shift 2: the radio check and the slings at the boom foot.
  await second.completeSteps('er-joints', 2);
}
