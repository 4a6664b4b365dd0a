// The plan generator, its checks and the dependency rule, against the invented demo crane model
// (server/demo/data/crane-model.json: plates from 66 m, four pins per joint, guy-line sets per
// length). Every expected count here comes from the computed make-up or the arrangement data,
// never from the generator itself.
import { describe, expect, it } from 'vitest';
import type { z } from 'zod';
import { activeStages, generatePlan, holdsNeedPeople, OPERATING_MODE_EXPECTED, planProblems } from '../../../shared/plan';
import { computeConfiguration } from '../../../shared/planner/compute';
import type { ConfigurationResults } from '../../../shared/planner/types';
import type { ArrangementData, InventoryItem } from '../../../shared/schemas/arrangement';
import { configurationSchema, type Configuration } from '../../../shared/schemas/configuration';
import type { CommsPlan, CrewRole } from '../../../shared/schemas/jobs';
import { planSchema, type Plan, type PlanStage, type PlanStep } from '../../../shared/schemas/plan';
import { configuration18m } from '../../helpers/jobs';
import { demoAssistCrane, demoCrane } from '../helpers';

const crane = demoCrane();
const assistCrane = demoAssistCrane();
const UNIT_ID = '6f1c2d3e-4a5b-4c6d-8e7f-0a1b2c3d4e5f';
const ASSIST_ID = '7a2b3c4d-5e6f-4a7b-8c9d-0e1f2a3b4c5d';
const ANN = '11111111-1111-4111-8111-111111111111';
const BEN = '22222222-2222-4222-8222-222222222222';
const CAL = '33333333-3333-4333-8333-333333333333';
const DEE = '44444444-4444-4444-8444-444444444444';

/** Every part a 90 m boom needs, all serviceable, serials like T-INS12-03. */
function fullKit(): InventoryItem[] {
  const kit: [InventoryItem['kind'], string, number][] = [
    ['section', 'base', 1], ['section', 'ins3', 1], ['section', 'ins6', 1], ['section', 'ins12', 6], ['section', 'tip', 1],
    ['guy_line', 'GT', 2], ['guy_line', 'GB', 2], ['guy_line', 'G3', 2], ['guy_line', 'G6', 2], ['guy_line', 'G12', 12],
    ['hook_block', 'HB160', 1], ['hook_block', 'HB120', 1], ['hook_block', 'BALL12', 1],
  ];
  return kit.flatMap(([kind, typeId, count]) =>
    Array.from({ length: count }, (_, i) => ({ serial: `T-${typeId.toUpperCase()}-${String(i + 1).padStart(2, '0')}`, kind, typeId, status: 'serviceable' as const })),
  );
}

const comms: CommsPlan = {
  radioChannel: 'Site 3',
  callSigns: [
    { userId: ANN, callSign: 'Base' },
    { userId: BEN, callSign: 'Cab' },
    { userId: CAL, callSign: 'Banksman 1' },
  ],
  motionSignallers: [
    { motion: 'boom hoist', userId: CAL },
    { motion: 'main hoist', userId: CAL },
  ],
  fallbackHandSignals: 'Stop, Emergency Stop, Raise Boom, Lower Boom, Hoist, Lower as agreed at the briefing',
};
const crewNames = { [ANN]: 'Ann Okafor', [BEN]: 'Ben Lusk', [CAL]: 'Cal Reyes', [DEE]: 'Dee Mason' };

/** The 18 m configuration with changes, through the schema so fields added later take their defaults. */
function config(overrides: Partial<z.input<typeof configurationSchema>> = {}): Configuration {
  return configurationSchema.parse({ ...configuration18m(UNIT_ID), ...overrides });
}

function compute(cfg: Configuration, arrangement: ArrangementData = crane): ConfigurationResults {
  return computeConfiguration(cfg, { arrangement, inventory: fullKit(), assistCrane });
}

function plan(kind: Plan['kind'], cfg: Configuration, arrangement: ArrangementData = crane): Plan {
  return generatePlan({ kind, configuration: cfg, results: compute(cfg, arrangement), arrangement, commsPlan: comms, crewNames });
}

function stage(p: Plan, id: string): PlanStage {
  const s = p.stages.find((x) => x.id === id);
  if (!s) throw new Error(`no stage ${id}; stages: ${p.stages.map((x) => x.id).join(', ')}`);
  return s;
}

function hasStep(p: Plan, id: string): boolean {
  return p.stages.some((s) => s.steps.some((st) => st.id === id));
}

/** The pins a step states, from its text ("…: 4 pins."). */
function statedPins(step: PlanStep): number {
  const m = /: (\d+) pins?\./.exec(step.text);
  if (!m) throw new Error(`step ${step.id} states no pin count: ${step.text}`);
  return Number(m[1]);
}

function allIds(p: Plan): string[] {
  return p.stages.flatMap((s) => [s.id, ...s.steps.map((st) => st.id), ...(s.hold ? [s.hold.id] : [])]);
}

const withAssist = (over: Partial<z.input<typeof configurationSchema>> = {}) =>
  config({
    assist: { assistCraneId: ASSIST_ID, chartId: 'boom-20.5m-full-cw', lifts: [{ label: 'Tip onto dollies', liftT: 4.1, riggingT: 0.2, radiusM: 9 }, { label: 'Base into the foot pins', liftT: 7.8, riggingT: 0.3, radiusM: 7 }] },
    // Voltages confirmed by the lines' owners and encroachment prevention in place, so the Table A distances apply.
    siteHazards: {
      powerLines: [
        { label: '33 kV line, east fence', voltageKv: 33, distanceM: 120, voltageConfirmedByOwner: true, encroachmentPreventionInPlace: true, assistDistanceM: 100 },
        { label: '400 kV line, north', voltageKv: 400, distanceM: 150, voltageConfirmedByOwner: true, encroachmentPreventionInPlace: true, assistDistanceM: 130 },
      ],
      buriedServices: 'Gas main 4 m west of the track line',
      neighbours: 'School next door: lifts outside 08:30-09:00 and 15:00-15:30',
      loadAndTagLineAllowanceM: 3,
      swayAllowanceM: 2,
    },
    ...over,
  });

describe('generatePlan: what the configuration needs', () => {
  const cases: [string, Configuration][] = [
    ['18 m', config()],
    ['18 m with auxiliary hoist and assist crane', withAssist({ auxiliary: { enabled: true, hookBlockId: 'BALL12' } })],
    ['60 m', config({ boomLengthM: 60, mainHook: { hookBlockId: 'HB160', parts: 10, lowestHookPositionM: 0 } })],
    ['66 m', config({ boomLengthM: 66 })],
    ['19 m, a length the data does not list', config({ boomLengthM: 19 })],
    ['90 m with mats, no ground source', config({ boomLengthM: 90, mats: { used: true, lengthM: 5, widthM: 1.2, thicknessM: 0.3, weightKg: 1100 }, ground: { groundType: 'made ground', allowablePressureKpa: 150, source: { kind: 'none', reference: '', designer: '' } } })],
  ];

  it.each(cases)('%s: both plans pass the plan schema and leave no placeholder unfilled', (_name, cfg) => {
    for (const kind of ['erection', 'dismantling'] as const) {
      const p = plan(kind, cfg);
      expect(() => planSchema.parse(p)).not.toThrow();
      expect(p.kind).toBe(kind);
      expect(JSON.stringify(p)).not.toMatch(/\{[A-Za-z]+\}/);
    }
  });

  it('a length the data does not list gives a plan without joints, guy lines or counterweight steps, and says why', () => {
    const cfg = config({ boomLengthM: 19 });
    expect(compute(cfg).makeup.arrangement).toBeNull();
    const er = plan('erection', cfg);
    expect(stage(er, 'er-joints').steps.map((s) => s.id)).toEqual(['er-joints.radio-check', 'er-joints.slings']);
    expect(stage(er, 'er-guys').steps.map((s) => s.id)).toEqual(['er-guys.radio-check', 'er-guys.bridle']);
    expect(stage(er, 'er-guy-layout').steps.map((s) => s.id)).toEqual(['er-guy-layout.radio-check']);
    expect(stage(er, 'er-upper').steps.some((s) => s.id.startsWith('er-upper.cw-'))).toBe(false);
    expect(stage(er, 'er-upper').hold?.instruction).toContain('not listed for this boom length');
    expect(er.briefing.sections[0].items.join(' ')).toMatch(/cannot be built as planned: 19 m is not a boom length/);
  });

  it('plates appear from the model threshold (66 m) up and not below it', () => {
    expect(crane.platesThresholdBoomLengthM).toBe(66);
    for (const length of [18, 60]) {
      const cfg = config({ boomLengthM: length });
      expect(compute(cfg).platesRequired).toBe(false);
      const er = plan('erection', cfg);
      const dm = plan('dismantling', cfg);
      expect(hasStep(er, 'er-ground.plates')).toBe(false);
      expect(hasStep(er, 'er-preraise.plates')).toBe(false);
      expect(hasStep(dm, 'dm-site.plates')).toBe(false);
    }
    for (const length of [66, 90]) {
      const cfg = config({ boomLengthM: length });
      expect(compute(cfg).platesRequired).toBe(true);
      const er = plan('erection', cfg);
      expect(stage(er, 'er-ground').steps.find((s) => s.id === 'er-ground.plates')?.requiresPhoto).toBe(true);
      expect(hasStep(er, 'er-preraise.plates')).toBe(true);
      expect(hasStep(plan('dismantling', cfg), 'dm-site.plates')).toBe(true);
    }
  });

  it('the auxiliary hoist stage and its steps appear only when the auxiliary is chosen', () => {
    const without = plan('erection', config());
    expect(without.stages.some((s) => s.id === 'er-aux')).toBe(false);
    expect(hasStep(without, 'er-tip.aux-sheave')).toBe(false);
    expect(hasStep(without, 'er-raise.aux-over-hoist')).toBe(false);
    expect(hasStep(plan('dismantling', config()), 'dm-unreeve.aux')).toBe(false);

    const cfg = config({ auxiliary: { enabled: true, hookBlockId: 'BALL12' } });
    const withAux = plan('erection', cfg);
    const aux = stage(withAux, 'er-aux');
    // Reeving the auxiliary hoist is reeving too: only after the tensioning hold.
    expect(aux.dependsOn).toEqual(['er-tension']);
    expect(aux.steps.some((s) => s.text.includes('BALL12'))).toBe(true);
    expect(hasStep(withAux, 'er-tip.aux-sheave')).toBe(true);
    expect(hasStep(withAux, 'er-raise.aux-over-hoist')).toBe(true);
    expect(stage(withAux, 'er-electrics').dependsOn).toContain('er-aux');
    expect(stage(withAux, 'er-check').steps.find((s) => s.id === 'er-check.aux-hook')?.records).toMatchObject({ kind: 'serial', componentKind: 'hook_block', typeId: 'BALL12' });
    expect(hasStep(plan('dismantling', cfg), 'dm-unreeve.aux')).toBe(true);
  });

  it('a step per power line in the site stage, and an assist-crane stage with a step per planned lift', () => {
    const cfg = withAssist();
    const er = plan('erection', cfg);
    const ground = stage(er, 'er-ground');
    const lines = ground.steps.filter((s) => s.id.startsWith('er-ground.power-line-'));
    expect(lines.map((s) => s.id)).toEqual(['er-ground.power-line-1', 'er-ground.power-line-2']);
    // 29 CFR 1926.1408 Table A: up to 50 kV → 10 ft = 3.05 m; over 350 to 500 kV → 25 ft = 7.62 m.
    expect(lines[0].text).toContain('3.05 m');
    expect(lines[1].text).toContain('7.62 m');
    expect(ground.steps.some((s) => s.text.includes('Gas main'))).toBe(true);
    expect(ground.steps.some((s) => s.id === 'er-ground.neighbours' && s.text.includes('School next door'))).toBe(true);

    const assist = stage(er, 'er-assist');
    expect(assist.involvesCraneMovement).toBe(true);
    const lifts = stage(er, 'er-assist-lifts');
    expect(lifts.dependsOn).toEqual(['er-assist']);
    expect(lifts.steps.filter((s) => /\.lift-\d+$/.test(s.id)).map((s) => s.id)).toEqual(['er-assist-lifts.lift-1', 'er-assist-lifts.lift-2']);
    expect(lifts.steps.find((s) => s.id === 'er-assist-lifts.check-1')?.text).toContain('(Tip onto dollies): the load is 4.3 t with rigging at 9 m radius');
    expect(stage(er, 'er-check').dependsOn).toEqual(['er-ground', 'er-assist']);
    expect(stage(plan('dismantling', cfg), 'dm-assist-lifts').steps.some((s) => s.id === 'dm-assist-lifts.lift-2')).toBe(true);

    const plain = plan('erection', config());
    expect(plain.stages.some((s) => s.id === 'er-assist')).toBe(false);
    expect(stage(plain, 'er-ground').steps.some((s) => s.id.includes('power-line'))).toBe(false);
  });

  it('counterweight: one step per block in fitting order, up to the raising counterweight', () => {
    for (const length of [18, 36, 90]) {
      const cfg = config({ boomLengthM: length });
      const raisingKg = crane.arrangements.find((a) => a.boomLengthM === length)?.raising.counterweightKg ?? NaN;
      const steps = stage(plan('erection', cfg), 'er-upper').steps.filter((s) => s.id.startsWith('er-upper.cw-') && s.id !== 'er-upper.cw-count');
      const blocks = crane.machine.counterweight.blocks.slice(0, steps.length);
      expect(steps.map((s) => s.id)).toEqual(blocks.map((b) => `er-upper.cw-${b.id}`));
      expect(blocks.reduce((sum, b) => sum + b.weightKg, 0)).toBe(raisingKg);
    }
  });
});

describe('generatePlan: one step per joint and per guy line, pins matching the computed count', () => {
  it.each([18, 60, 90])('%d m: joint steps + guy-line steps state exactly makeup.pinCount.total pins', (length) => {
    const cfg = config({ boomLengthM: length });
    const results = compute(cfg);
    expect(results.makeup.buildable).toBe(true);
    for (const kind of ['erection', 'dismantling'] as const) {
      const p = plan(kind, cfg);
      const jointSteps = kind === 'erection'
        ? stage(p, 'er-joints').steps.filter((s) => /\.joint-\d+$/.test(s.id))
        : p.stages.filter((s) => s.id.startsWith('dm-joint-')).flatMap((s) => s.steps.filter((st) => st.id.endsWith('.pins')));
      const guySteps = stage(p, kind === 'erection' ? 'er-guys' : 'dm-guys').steps.filter((s) => s.id.includes('.line-'));
      expect(jointSteps).toHaveLength(results.makeup.sections.length - 1);
      expect(guySteps).toHaveLength(results.makeup.totalGuyLineCount);
      const jointPins = jointSteps.reduce((sum, s) => sum + statedPins(s), 0);
      const guyPins = guySteps.reduce((sum, s) => sum + statedPins(s), 0);
      expect(jointPins).toBe(results.makeup.pinCount.jointPins);
      expect(guyPins).toBe(results.makeup.pinCount.guyLinePins);
      expect(jointPins + guyPins).toBe(results.makeup.pinCount.total);
    }
  });

  it('a joint takes the pins per joint of the section above it, and asks for a photo', () => {
    // Different pins per type, so a joint reading the section below (or the base) would show up.
    const varied: ArrangementData = structuredClone(crane);
    const pins: Record<string, number> = { base: 9, ins3: 3, ins6: 5, ins12: 6, tip: 7 };
    for (const t of varied.sectionTypes) t.pinsPerJoint = pins[t.id];
    const cfg = config({ boomLengthM: 60 });
    const results = compute(cfg, varied);
    const joints = stage(plan('erection', cfg, varied), 'er-joints').steps.filter((s) => /\.joint-\d+$/.test(s.id));
    expect(joints.map(statedPins)).toEqual(results.makeup.sections.slice(1).map((s) => pins[s.typeId]));
    expect(joints.reduce((sum, s) => sum + statedPins(s), 0)).toBe(results.makeup.pinCount.jointPins);
    expect(joints.every((s) => s.requiresPhoto)).toBe(true);
    expect(joints.every((s) => /keepers/.test(s.text))).toBe(true);
  });

  it('a guy-line step for each of the quantity lines of each mark, recording its planned serial', () => {
    const cfg = config({ boomLengthM: 42 });
    const results = compute(cfg);
    // The serial is recorded where the line is laid out; pinning records the pins.
    const guys = stage(plan('erection', cfg), 'er-guy-layout').steps.filter((s) => s.id.includes('.line-'));
    const expected = results.makeup.guyLines.flatMap((g) => g.serials.map((serial, i) => ({ id: `er-guy-layout.line-${g.mark}-${i + 1}`, typeId: g.mark, plannedSerial: serial })));
    expect(expected).toHaveLength(10);
    expect(guys.map((s) => ({ id: s.id, typeId: s.records?.typeId, plannedSerial: s.records?.plannedSerial }))).toEqual(expected);
    expect(guys.every((s) => s.records?.kind === 'serial' && s.records.componentKind === 'guy_line')).toBe(true);
  });

  it('one lay-down step per section position, recording the planned serial (the as-built record)', () => {
    for (const length of [18, 90]) {
      const cfg = config({ boomLengthM: length });
      const results = compute(cfg);
      const laydown = stage(plan('erection', cfg), 'er-check').steps.filter((s) => /\.position-\d+$/.test(s.id));
      expect(laydown).toHaveLength(results.makeup.sections.length);
      results.makeup.sections.forEach((pos, i) => {
        expect(laydown[i].id).toBe(`er-check.position-${pos.position}`);
        expect(pos.serial).not.toBeNull();
        expect(laydown[i].records).toEqual({ kind: 'serial', label: expect.any(String), unit: null, componentKind: 'section', typeId: pos.typeId, plannedSerial: pos.serial, check: null });
      });
    }
    // The 90 m boom uses all six 12 m inserts, each at its own position with its own serial.
    const serials90 = compute(config({ boomLengthM: 90 })).makeup.sections.filter((s) => s.typeId === 'ins12').map((s) => s.serial);
    expect(new Set(serials90).size).toBe(6);
  });
});

describe('generatePlan: holds', () => {
  const roles: CrewRole[] = ['supervisor', 'operator', 'signaller', 'rigger'];
  const crewOfFour = roles.map((role, i) => ({ userId: [ANN, BEN, CAL, DEE][i], role }));

  it('every hold names at least one acknowledging role and is released by the supervisor; a crew of four covers them all', () => {
    for (const kind of ['erection', 'dismantling'] as const) {
      const p = plan(kind, withAssist({ boomLengthM: 60, auxiliary: { enabled: true, hookBlockId: 'BALL12' } }));
      const holds = p.stages.flatMap((s) => (s.hold ? [s.hold] : []));
      expect(holds.length).toBeGreaterThan(5);
      for (const h of holds) {
        expect(h.requiredRoles.length).toBeGreaterThanOrEqual(1);
        expect(new Set(h.requiredRoles).size).toBe(h.requiredRoles.length);
        expect(h.requiredRoles).not.toContain('viewer');
        expect(h.releasingRole).toBe('supervisor');
        expect(h.id).toBe(`${p.stages.find((s) => s.hold === h)?.id}.hold`);
      }
      expect(holdsNeedPeople(p, crewOfFour)).toEqual([]);
    }
  });

  it('ground and communications, assist set-up, joints, guy-line pins, configuration entry, tensioning, pre-raise, function tests and handover are mandatory', () => {
    const p = plan('erection', withAssist());
    for (const id of ['er-ground', 'er-assist', 'er-joints', 'er-guys', 'er-config', 'er-tension', 'er-preraise', 'er-raise', 'er-handover']) {
      expect(stage(p, id).hold?.mandatory, id).toBe(true);
    }
    // The rest may be skipped with a reason, so they must not be marked mandatory by accident.
    for (const id of ['er-upper', 'er-check', 'er-reeve']) {
      expect(stage(p, id).hold?.mandatory, id).toBe(false);
    }
    expect(stage(p, 'er-preraise').hold?.requiredRoles.sort()).toEqual(['operator', 'rigger', 'signaller', 'supervisor']);
  });

  it('the configuration-entry value check expects the configuration’s values', () => {
    const cfg = config({ boomLengthM: 60, mainHook: { hookBlockId: 'HB160', parts: 10, lowestHookPositionM: 0 } });
    const hold = stage(plan('erection', cfg), 'er-config').hold;
    const raisingKg = crane.arrangements.find((a) => a.boomLengthM === 60)?.raising.counterweightKg;
    expect(raisingKg).toBe(95000);
    expect(hold?.valueCheck?.fields).toEqual([
      { field: 'boomLengthM', expected: '60' },
      { field: 'hookBlockId', expected: 'HB160' },
      { field: 'parts', expected: '10' },
      { field: 'counterweightT', expected: '95' },
      { field: 'operatingMode', expected: OPERATING_MODE_EXPECTED },
    ]);
    expect(OPERATING_MODE_EXPECTED).toBe('lifting');
    // No other hold carries a value check.
    expect(plan('erection', cfg).stages.filter((s) => s.hold?.valueCheck).map((s) => s.id)).toEqual(['er-config']);
  });
});

describe('generatePlan: dismantling is its own plan', () => {
  const cfg = config({ boomLengthM: 60 });
  const dm = plan('dismantling', cfg);
  const er = plan('erection', cfg);
  const results = compute(cfg);
  const byId = new Map(dm.stages.map((s, i) => [s.id, i]));

  it('boom onto blocking, guy lines slack, guy-line pins and counterweight are mandatory holds in that order', () => {
    for (const id of ['dm-site', 'dm-lower', 'dm-slacken', 'dm-guys', 'dm-counterweight']) expect(stage(dm, id).hold?.mandatory, id).toBe(true);
    expect(stage(dm, 'dm-lower').steps.some((s) => /blocking/.test(s.text))).toBe(true);
    // Slack before any guy-line pin: the unpinning stage waits for the slackening stage.
    expect(stage(dm, 'dm-guys').dependsOn).toContain('dm-slacken');
    expect(byId.get('dm-slacken')).toBeLessThan(byId.get('dm-guys') as number);
    expect(stage(dm, 'dm-slacken').hold?.instruction).toMatch(/slack/);
  });

  it('each joint, tip first: a support stage with a mandatory hold, then the stage that draws its pins', () => {
    const jointCount = results.makeup.sections.length - 1;
    const order = dm.stages.map((s) => s.id).filter((id) => id.startsWith('dm-support-') || id.startsWith('dm-joint-'));
    const expected: string[] = [];
    for (let n = jointCount; n >= 1; n -= 1) expected.push(`dm-support-${n}`, `dm-joint-${n}`);
    expect(order).toEqual(expected);
    for (let n = 1; n <= jointCount; n += 1) {
      const support = stage(dm, `dm-support-${n}`);
      const draw = stage(dm, `dm-joint-${n}`);
      expect(support.hold?.mandatory).toBe(true);
      expect(draw.hold?.mandatory).toBe(true);
      expect(draw.dependsOn).toEqual([support.id]);
      expect(support.hold?.instruction).toMatch(/nobody is inside or under the boom/);
      expect(draw.steps.find((s) => s.id.endsWith('.pins'))?.text).toMatch(/from the outside/);
      const serial = draw.steps.find((s) => s.records?.kind === 'serial');
      expect(serial?.records?.plannedSerial).toBe(results.makeup.sections[n].serial);
    }
    expect(stage(dm, `dm-support-${jointCount}`).dependsOn).toEqual(['dm-guys']);
    // The counterweight comes off after the last joint and with the mast on its rest.
    expect(stage(dm, 'dm-counterweight').dependsOn).toEqual(['dm-joint-1', 'dm-mast']);
  });

  it('counterweight comes off in the stated order: the last block fitted first', () => {
    const fitted = stage(er, 'er-upper').steps.filter((s) => s.id.startsWith('er-upper.cw-') && s.id !== 'er-upper.cw-count').map((s) => s.id.replace('er-upper.cw-', ''));
    const off = stage(dm, 'dm-counterweight').steps.filter((s) => s.id.startsWith('dm-counterweight.off-')).map((s) => s.id.replace('dm-counterweight.off-', ''));
    expect(fitted.length).toBeGreaterThan(1);
    expect(off).toEqual([...fitted].reverse());
  });

  it('is not the erection plan reversed: its own stage ids, titles and holds', () => {
    const erIds = new Set(er.stages.map((s) => s.id));
    expect(dm.stages.some((s) => erIds.has(s.id))).toBe(false);
    expect(dm.stages.map((s) => s.title)).not.toEqual([...er.stages].reverse().map((s) => s.title));
    const erTitles = new Set(er.stages.map((s) => s.title));
    expect(dm.stages.filter((s) => erTitles.has(s.title)).map((s) => s.title)).toEqual([]);
    const erHoldTitles = new Set(er.stages.flatMap((s) => (s.hold ? [s.hold.title] : [])));
    expect(dm.stages.filter((s) => s.hold && erHoldTitles.has(s.hold.title))).toEqual([]);
    expect(dm.stages.filter((s) => s.hold?.mandatory).length).toBeGreaterThan(er.stages.filter((s) => s.hold?.mandatory).length);
  });
});

describe('generatePlan: communications, ids and briefing', () => {
  it('a radio check is the first step of every stage where the crane or the assist crane moves', () => {
    for (const cfg of [config(), withAssist({ boomLengthM: 90, auxiliary: { enabled: false, hookBlockId: null } }), config({ auxiliary: { enabled: true, hookBlockId: 'BALL12' } })]) {
      for (const kind of ['erection', 'dismantling'] as const) {
        const moving = plan(kind, cfg).stages.filter((s) => s.involvesCraneMovement);
        expect(moving.length).toBeGreaterThan(5);
        for (const s of moving) {
          expect(s.steps[0]?.id, s.id).toBe(`${s.id}.radio-check`);
          expect(s.steps[0].text).toMatch(/^Radio check on channel Site 3/);
        }
      }
    }
  });

  it('the site stage carries the communications plan: channel, call signs with names, who directs which motion, hand signals', () => {
    const ground = stage(plan('erection', config()), 'er-ground');
    const text = ground.steps.map((s) => s.text).join('\n');
    expect(text).toContain('channel Site 3');
    expect(text).toContain('Banksman 1 for Cal Reyes');
    expect(text).toContain('boom hoist: Cal Reyes (Banksman 1)');
    expect(text).toContain('swing: nobody assigned yet');
    expect(text).not.toContain('assist crane:');
    expect(text).toContain('Raise Boom, Lower Boom');
    expect(ground.steps.some((s) => s.id === 'er-ground.radio-check')).toBe(true);
    expect(ground.steps.some((s) => s.id === 'er-ground.toolbox-talk')).toBe(true);
  });

  it('ids are unique and the same on every generation; unchanged things keep their ids when the configuration changes', () => {
    for (const kind of ['erection', 'dismantling'] as const) {
      const cfg = withAssist({ boomLengthM: 90, auxiliary: { enabled: true, hookBlockId: 'BALL12' } });
      const a = plan(kind, cfg);
      const b = plan(kind, structuredClone(cfg));
      const ids = allIds(a);
      expect(new Set(ids).size).toBe(ids.length);
      expect(ids.every((id) => id.length <= 64 && /^[A-Za-z0-9_.:-]+$/.test(id))).toBe(true);
      expect(b).toEqual(a);
    }
    const at60 = allIds(plan('erection', config({ boomLengthM: 60 })));
    const at66 = new Set(allIds(plan('erection', config({ boomLengthM: 66 }))));
    for (const id of ['er-ground.hold', 'er-joints.joint-3', 'er-check.position-2', 'er-guys.line-GT-1', 'er-config.hold', 'er-upper.cw-CW1']) {
      expect(at60).toContain(id);
      expect(at66.has(id), id).toBe(true);
    }
  });

  it('writes a required distance, a share of the chart and a load rounded up, and the distance left rounded down', () => {
    // The load on the assist hook is 4.101 + 0.2 = 4.301 t; to the nearest 0.01 t it would read 4.3 t, under the load.
    const cfg = withAssist({
      boomLengthM: 66,
      assist: { assistCraneId: ASSIST_ID, chartId: 'boom-20.5m-full-cw', lifts: [{ label: 'Tip onto dollies', liftT: 4.101, riggingT: 0.2, radiusM: 9 }] },
    });
    const base = compute(cfg);
    // Invented figures between grid points, where a rounding to the nearest reads the unsafe way:
    // 6.0949 m required would read 6.09, a 41.21 % share 41.2 %, a 70.01 m fall zone 70 m, 17.69 m left 17.7 m.
    const results: ConfigurationResults = {
      ...base,
      fallZoneRadiusM: 70.01,
      powerLines: base.powerLines.map((l, i) => (i === 0 ? { ...l, requiredClearanceM: 6.0949, availableClearanceM: 17.69 } : l)),
      assistLifts: base.assistLifts.map((a, i) => (i === 0 ? { ...a, sharePercent: 41.21, chartRadiusM: 9 } : a)),
    };
    const p = generatePlan({ kind: 'erection', configuration: cfg, results, arrangement: crane, commsPlan: comms, crewNames });
    const hazards = p.briefing.sections.find((s) => s.heading === 'Hazards')?.items.join('\n') ?? '';
    // Required distance shown rounded up to 0.01 m, the distance left rounded down to 0.1 m, the fall zone rounded up to 0.1 m.
    expect(hazards).toContain('minimum approach distance 6.10 m');
    expect(hazards).toContain(' 17.6 m left between the line');
    expect(hazards).toContain('Exclusion zone: 70.1 m around the slewing centre');
    const texts = p.stages.flatMap((st) => st.steps.map((x) => x.text));
    // The same figures in the steps: required distance and fall zone shown rounded up.
    expect(texts.some((t) => t.includes('minimum approach distance 6.10 m'))).toBe(true);
    expect(texts.some((t) => t.includes('at least 70.1 m from the slewing centre'))).toBe(true);
    // The load on the hook and the share of the chart shown rounded up.
    expect(texts.some((t) => t.includes('the load is 4.31 t with rigging at 9 m radius, 41.3 % of the chart capacity read at 9 m'))).toBe(true);
  });

  it('the briefing covers the job, hazards, holds in order, communications, stop rules and the safety notice', () => {
    const cfg = withAssist({ boomLengthM: 66 });
    const p = plan('erection', cfg);
    const results = compute(cfg);
    const section = (heading: string) => p.briefing.sections.find((s) => s.heading === heading)?.items.join('\n') ?? '';
    expect(p.briefing.sections.map((s) => s.heading)).toEqual(['The job', 'Hazards', 'Hold points, in order', 'Communications', 'Stop rules', 'Safety notice']);
    expect(section('The job')).toContain('66 m boom');
    expect(section('The job')).toContain('HB120 on 6 parts of line');
    expect(section('The job')).toContain('20 t plus 0.8 t of rigging at 8 m radius');
    expect(section('The job')).toContain('counterweight 95 t, crawler gauge 7 m');
    expect(section('The job')).toMatch(/Steel plates under the crawler ends: required/);
    expect(section('Hazards')).toContain('minimum approach distance 3.05 m');
    // The exclusion zone is the computed fall zone shown to 0.1 m and never below it.
    const zone = Number(/Exclusion zone: ([\d.]+) m/.exec(section('Hazards'))?.[1]);
    expect(zone).toBeGreaterThanOrEqual(results.fallZoneRadiusM);
    expect(zone).toBeLessThan(results.fallZoneRadiusM + 0.1);
    expect(section('Hazards')).toContain('Gas main');
    expect(section('Hazards')).toContain('School next door');
    expect(section('Hazards')).toMatch(/assembly gust \d+(\.\d+)? m\/s, mean/);
    const holdItems = p.briefing.sections.find((s) => s.heading === 'Hold points, in order')?.items ?? [];
    const holds = p.stages.filter((s) => s.hold);
    expect(holdItems).toHaveLength(holds.length);
    holds.forEach((s, i) => expect(holdItems[i]).toContain(s.hold?.title));
    expect(holdItems[0]).toMatch(/supervisor, operator and signaller.*Mandatory/);
    expect(section('Communications')).toContain('Site 3');
    expect(section('Stop rules')).toMatch(/Anyone may call a stop/);
    expect(section('Stop rules')).toMatch(/radio and hand signal first/);
    expect(section('Safety notice')).toMatch(/manufacturer’s manual, the lift plan and the crane’s own limiter/);
    expect(section('Safety notice')).toMatch(/competent person/);
    expect(plan('dismantling', cfg).briefing.title).toMatch(/taking down/);
  });
});

describe('activeStages: dependencies', () => {
  const p = plan('erection', config({ boomLengthM: 60 }));
  const active = (...done: string[]) => activeStages(p, new Set(done));

  it('starts with the site stage alone', () => {
    expect(active()).toEqual(['er-ground']);
    expect(active('er-ground')).toEqual(['er-upper', 'er-check']);
  });

  it('guy lines may be laid out once the component check is done, while the joints are still being pinned', () => {
    expect(active('er-ground', 'er-upper')).not.toContain('er-guy-layout');
    expect(active('er-ground', 'er-check')).toContain('er-guy-layout');
    expect(active('er-ground', 'er-check')).not.toContain('er-joints');
    expect(active('er-ground', 'er-upper', 'er-check')).toEqual(['er-joints', 'er-guy-layout']);
  });

  it('guy lines are pinned only after every joint; tensioning waits for the pinned lines and the tip; reeving waits for tensioning', () => {
    const before = ['er-ground', 'er-upper', 'er-check'];
    expect(active(...before, 'er-guy-layout')).toEqual(['er-joints']);
    expect(active(...before, 'er-joints')).toEqual(['er-guy-layout', 'er-tip']);
    expect(active(...before, 'er-joints', 'er-guy-layout')).toEqual(['er-guys', 'er-tip']);
    expect(active(...before, 'er-joints', 'er-guy-layout', 'er-tip')).toEqual(['er-guys']);
    expect(active(...before, 'er-joints', 'er-guy-layout', 'er-tip', 'er-guys')).toEqual(['er-tension']);
    expect(active(...before, 'er-joints', 'er-guy-layout', 'er-tip', 'er-guys', 'er-tension')).toEqual(['er-reeve']);
  });

  it('a stage waiting for an unknown stage never becomes active', () => {
    const broken = structuredClone(p);
    broken.stages[1].dependsOn = ['er-ground', 'er-missing'];
    expect(activeStages(broken, new Set(['er-ground', 'er-missing']))).not.toContain(broken.stages[1].id);
  });
});

describe('planProblems', () => {
  const reference = plan('erection', config({ boomLengthM: 60 }));
  const edit = (change: (p: Plan) => void): Plan => {
    const p = structuredClone(reference);
    change(p);
    return p;
  };
  const codes = (p: Plan) => planProblems(p, reference).map((x) => x.code);
  const idx = (p: Plan, id: string) => p.stages.findIndex((s) => s.id === id);

  it('finds nothing in the generated plans', () => {
    expect(planProblems(reference, reference)).toEqual([]);
    const dm = plan('dismantling', withAssist({ boomLengthM: 90 }));
    expect(planProblems(dm, dm)).toEqual([]);
  });

  it('finds a cycle, an unknown dependency and a stage that can never start', () => {
    const cyclic = edit((p) => {
      p.stages[idx(p, 'er-preraise')].dependsOn = ['er-config', 'er-raise'];
    });
    const problems = planProblems(cyclic, reference);
    expect(problems.filter((x) => x.code === 'cycle')).toHaveLength(1);
    expect(problems.find((x) => x.code === 'cycle')?.message).toMatch(/Pre-raise checks/);
    // Handover waits for the raise, which is in the cycle.
    expect(problems.filter((x) => x.code === 'unreachable').map((x) => x.path)).toEqual([`stages.${idx(cyclic, 'er-handover')}.dependsOn`]);

    const self = edit((p) => {
      p.stages[0].dependsOn = ['er-ground'];
    });
    expect(codes(self)).toContain('cycle');

    const unknown = edit((p) => {
      p.stages[idx(p, 'er-tip')].dependsOn = ['er-joints', 'er-nowhere'];
    });
    const u = planProblems(unknown, reference);
    expect(u.find((x) => x.code === 'unknown_dependency')?.path).toBe(`stages.${idx(unknown, 'er-tip')}.dependsOn.1`);
    // Everything after the tip can no longer start.
    expect(u.filter((x) => x.code === 'unreachable').length).toBeGreaterThanOrEqual(5);
  });

  it('finds duplicate ids and a hold nobody can acknowledge', () => {
    expect(codes(edit((p) => { p.stages[1].steps[1].id = p.stages[1].steps[0].id; }))).toEqual(['duplicate_id']);
    expect(codes(edit((p) => { p.stages[2].id = p.stages[1].id; }))).toContain('duplicate_id');
    const noRoles = edit((p) => {
      const h = p.stages[idx(p, 'er-check')].hold;
      if (h) h.requiredRoles = [];
    });
    expect(codes(noRoles)).toEqual(['no_acknowledging_role']);
    const viewerOnly = edit((p) => {
      const h = p.stages[idx(p, 'er-check')].hold;
      if (h) h.requiredRoles = ['viewer'];
    });
    expect(codes(viewerOnly)).toEqual(['no_acknowledging_role']);
  });

  it('finds a mandatory hold removed, marked not mandatory, or stripped of a role or a value-check field', () => {
    expect(codes(edit((p) => { p.stages[idx(p, 'er-tension')].hold = null; }))).toEqual(['mandatory_hold_removed']);
    // The stage goes with its required steps: the examination and the handover itself.
    expect(codes(edit((p) => { p.stages.splice(idx(p, 'er-handover'), 1); }))).toEqual(['mandatory_hold_removed', 'required_step_removed', 'required_step_removed']);
    expect(codes(edit((p) => {
      const h = p.stages[idx(p, 'er-config')].hold;
      if (h) h.mandatory = false;
    }))).toEqual(['mandatory_hold_removed']);
    const lostRole = edit((p) => {
      const h = p.stages[idx(p, 'er-preraise')].hold;
      if (h) h.requiredRoles = h.requiredRoles.filter((r) => r !== 'signaller');
    });
    const lost = planProblems(lostRole, reference);
    expect(lost.map((x) => x.code)).toEqual(['mandatory_role_removed']);
    expect(lost[0].message).toMatch(/signaller/);
    expect(codes(edit((p) => {
      const h = p.stages[idx(p, 'er-config')].hold;
      if (h?.valueCheck) h.valueCheck.fields = h.valueCheck.fields.filter((f) => f.field !== 'counterweightT');
    }))).toEqual(['mandatory_hold_removed']);
  });

  it('allows adding roles to a mandatory hold and changing non-mandatory holds', () => {
    expect(codes(edit((p) => { p.stages[idx(p, 'er-tension')].hold?.requiredRoles.push('rigger'); }))).toEqual([]);
    expect(codes(edit((p) => { p.stages[idx(p, 'er-check')].hold = null; }))).toEqual([]);
    expect(codes(edit((p) => {
      const h = p.stages[idx(p, 'er-reeve')].hold;
      if (h) h.requiredRoles = ['rigger'];
    }))).toEqual([]);
    // Without a reference only the structure is checked.
    expect(planProblems(edit((p) => { p.stages[idx(p, 'er-tension')].hold = null; }), null)).toEqual([]);
  });
});

describe('holdsNeedPeople: different people per role (matching, not counting)', () => {
  const base = plan('erection', config());
  const onlyTension: Plan = { ...base, stages: base.stages.filter((s) => s.id === 'er-tension').map((s) => ({ ...s, dependsOn: [] })) };

  it('one person holding both operator and signaller cannot satisfy a hold that needs both', () => {
    expect(stage(onlyTension, 'er-tension').hold?.requiredRoles).toEqual(['operator', 'signaller']);
    const problems = holdsNeedPeople(onlyTension, [{ userId: ANN, role: 'operator' }, { userId: ANN, role: 'signaller' }]);
    expect(problems.map((p) => p.code)).toEqual(['holds_need_more_people']);
    expect(problems[0].path).toBe('stages.0.hold.requiredRoles');
  });

  it('two people can', () => {
    expect(holdsNeedPeople(onlyTension, [{ userId: ANN, role: 'operator' }, { userId: BEN, role: 'signaller' }])).toEqual([]);
  });

  it('finds the assignment a first-come choice would miss', () => {
    // Ann could be either; Ben only the signaller. Taking the signaller's place first, Ann would
    // look like the signaller and leave nobody for the operator; the matching moves her across.
    const signallerFirst = structuredClone(onlyTension);
    const hold = signallerFirst.stages[0].hold;
    if (hold) hold.requiredRoles = ['signaller', 'operator'];
    const crew = [{ userId: ANN, role: 'signaller' as const }, { userId: ANN, role: 'operator' as const }, { userId: BEN, role: 'signaller' as const }];
    expect(holdsNeedPeople(signallerFirst, crew)).toEqual([]);
    expect(holdsNeedPeople(signallerFirst, crew.slice(0, 2)).map((p) => p.code)).toEqual(['holds_need_more_people']);
    // The pre-raise hold needs four different people: three with every role are not enough.
    const three = [ANN, BEN, CAL].flatMap((userId) => (['supervisor', 'operator', 'signaller', 'rigger'] as const).map((role) => ({ userId, role })));
    const problems = holdsNeedPeople(base, three);
    expect(problems.map((p) => p.path)).toEqual([`stages.${base.stages.findIndex((s) => s.id === 'er-preraise')}.hold.requiredRoles`]);
  });
});
