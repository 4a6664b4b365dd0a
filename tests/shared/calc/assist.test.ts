// The assist crane. Reading its chart at the next longer listed radius, never between or beyond
// the rows, and the caution share are common practice, no source; the assist crane's own chart,
// limiter and outrigger-load data govern. Chart values and weights are the invented demo data;
// expected values are worked out here, beside each check, by other routes than the code's.
import { evaluate } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { assistLiftCheck, chartCapacityKn, padPressure, tandemRadiusM, tandemRaise, tipReactionKn } from '../../../shared/calc';
import { computeConfiguration } from '../../../shared/planner/compute';
import type { ConfigurationResults } from '../../../shared/planner/types';
import type { InventoryItem } from '../../../shared/schemas/arrangement';
import { configurationSchema, type Configuration, type Figure } from '../../../shared/schemas/configuration';
import { demoAssistCrane, demoCrane, expectCalcError, relErr, demoKit } from '../helpers';

const assist = demoAssistCrane();
const chart = assist.charts[0]; // 11.6 m boom: 3.0 m 50 t, 3.5 m 45 t, 4 m 40.5 t, 5 m 33 t, 6 m 27.5 t, 7 m 23 t, 8 m 19.5 t, 9 m 16.5 t
const chart20 = assist.charts[1]; // 20.5 m boom: … 8 m 17.0 t, 10 m 13.0 t, 12 m 10.2 t …
const tToKn = (t: number) => evaluate(`${t} tonne * gravity`).toNumber('kN') as number;

describe('chartCapacityKn (common practice, no source)', () => {
  it('a listed radius reads its own capacity, tonnes → kN as mathjs converts them', () => {
    const r = chartCapacityKn(chart, 8);
    expect(r.chartRadiusM).toBe(8);
    if (r.covered) expect(relErr(r.capacityKn, tToKn(19.5))).toBeLessThan(1e-12);
  });

  it('between radii reads the next longer radius (7.01 m → 8 m, 19.5 t), never the 22.99 t a straight line would give', () => {
    const r = chartCapacityKn(chart, 7.01);
    expect(r.chartRadiusM).toBe(8);
    expect(r.capacityT).toBe(19.5);
  });

  it('beyond the last radius and inside the first there is no capacity', () => {
    const far = chartCapacityKn(chart, 9.01);
    expect(far.covered).toBe(false);
    if (!far.covered) expect(far.reason).toMatch(/beyond the chart's last radius 9 m/);
    expect(chartCapacityKn(chart, 2.5).covered).toBe(false);
  });

  it('refuses a zero or NaN radius', () => {
    expectCalcError(() => chartCapacityKn(chart, 0), 'radiusM');
    expectCalcError(() => chartCapacityKn(chart, Number.NaN), 'radiusM');
  });
});

describe('assistLiftCheck: everything on the assist crane’s hook against its chart', () => {
  it('lift 4 t + rigging 0.2 t + hook block 0.5 t + slings 0.1 t + shackles 0.05 t + deductions 0.3 t = 5.15 t at 9 m, read at 10 m (13.0 t) → 39.6 %', () => {
    const r = assistLiftCheck({ liftKn: tToKn(4), riggingKn: tToKn(0.2), hookBlockKn: tToKn(0.5), slingsKn: tToKn(0.1), shacklesKn: tToKn(0.05), deductionsKn: tToKn(0.3), chart: chart20, radiusM: 9, cautionPercent: 75 });
    expect(r.chartRadiusM).toBe(10);
    expect(r.sharePercent).toBeCloseTo((5.15 / 13) * 100, 9);
    expect(r.band).toBe('pass');
  });

  it('exactly 100 % is within the chart but above the caution share; anything above 100 % fails', () => {
    const capacity = tToKn(19.5);
    const at = assistLiftCheck({ liftKn: capacity - 5, riggingKn: 5, chart, radiusM: 7.5, cautionPercent: 75 });
    expect(at.sharePercent).toBeCloseTo(100, 9);
    expect([at.band, at.pass]).toEqual(['caution', true]);
    const over = assistLiftCheck({ liftKn: capacity - 4.9, riggingKn: 5, chart, radiusM: 7.5, cautionPercent: 75 });
    expect([over.band, over.pass]).toEqual(['fail', false]);
    expect(over.reason).toMatch(/above 100 %/);
  });

  it('off the chart fails with the reason, no share', () => {
    const r = assistLiftCheck({ liftKn: 10, riggingKn: 1, chart, radiusM: 12 });
    expect([r.band, r.sharePercent]).toEqual(['fail', null]);
  });
});

describe('padPressure: q = (pad load + pad weight) ÷ area, uniform under a rigid pad loaded centrally (Das, Principles of Foundation Engineering: q = Q/A)', () => {
  it('26 t on a 1.2 m × 1.2 m pad of 250 kg → 178.77 kPa, as mathjs works it out in its own units', () => {
    const expected = evaluate('(26 tonne + 250 kg) * gravity / (1.2 m * 1.2 m)').toNumber('kPa') as number;
    const r = padPressure({ loadKn: tToKn(26), padLengthM: 1.2, padWidthM: 1.2, padWeightKn: tToKn(0.25) });
    expect(relErr(r.pressureKpa, expected)).toBeLessThan(1e-12);
    expect(r.pressureKpa).toBeCloseTo(178.767, 3);
  });

  it('refuses a pad without an area', () => {
    expectCalcError(() => padPressure({ loadKn: 10, padLengthM: 0, padWidthM: 1, padWeightKn: 0 }), 'padLengthM');
  });
});

describe('tipReactionKn: the assist crane’s share of the boom at the tip', () => {
  it('a uniform boom (centre of gravity mid-length) puts half its weight on each support (a simply supported beam under a uniform load, R = wL/2: Beer & Johnston, Vector Mechanics for Engineers: Statics, from memory)', () => {
    expect(tipReactionKn({ boomWeightKn: 100, boomCogFromFootM: 30, boomLengthM: 60, tipLoadKn: 0 }).reactionKn).toBeCloseTo(50, 12);
    expect(tipReactionKn({ boomWeightKn: 100, boomCogFromFootM: 30, boomLengthM: 60, tipLoadKn: 7 }).reactionKn).toBeCloseTo(57, 12);
  });

  it('the demo 78 m boom raised to 30°: the moment of each section about the foot pin, taken in the plane at 30°, gives the same tip reaction as the flat boom', () => {
    const crane = demoCrane();
    const a = crane.arrangements.find((x) => x.boomLengthM === 78)!;
    const types = new Map(crane.sectionTypes.map((t) => [t.id, t]));
    const c = Math.cos(Math.PI / 6);
    let start = 0;
    let moment = 0; // kN·m: the horizontal lever of each section's centre of gravity at 30° × its weight
    let weight = 0;
    let firstMoment = 0; // kN·m along the boom, for the centre of gravity the code is given
    for (const id of a.sectionTypeIds) {
      const t = types.get(id)!;
      const w = tToKn(t.weightKg / 1000);
      weight += w;
      moment += (start + t.cogFromFootM) * c * w;
      firstMoment += (start + t.cogFromFootM) * w;
      start += t.lengthM;
    }
    // The assist line vertical at the tip, whose horizontal lever is 78 cos 30°: R = moment ÷ (78 cos 30°)
    const expected = moment / (78 * c);
    const r = tipReactionKn({ boomWeightKn: weight, boomCogFromFootM: firstMoment / weight, boomLengthM: 78, tipLoadKn: 0 });
    expect(relErr(r.reactionKn, expected)).toBeLessThan(1e-12);
    // 30,550 kg of sections, 13,838 kg of it at the tip
    expect(r.reactionKn / tToKn(1)).toBeCloseTo(13.838, 3);
  });
});

describe('tandemRadiusM: the tip comes back by L(1 − cos θ) as the boom rises (plane geometry)', () => {
  it('78 m boom, assist crane 10 m in from the tip and 8 m to the side, at 60°: dx = 78 × 0.5 − 10 = 29 → √(29² + 8²) = √905', () => {
    expect(tandemRadiusM({ boomLengthM: 78, boomAngleDeg: 60, alongFromTipM: 10, sideM: 8 })).toBeCloseTo(Math.sqrt(905), 9);
    expect(tandemRadiusM({ boomLengthM: 78, boomAngleDeg: 0, alongFromTipM: 10, sideM: 8 })).toBeCloseTo(Math.sqrt(164), 9);
  });
});

describe('tandemRaise: steps every 10° up to the release angle, where the tip leaves the assist', () => {
  it('release at 25°: steps at 0°, 10°, 20° and 25°; the share at each radius against the chart', () => {
    const r = tandemRaise({ boomWeightKn: 100, boomCogFromFootM: 30, boomLengthM: 60, tipLoadKn: 0, riggingKn: 0, footHeightM: 2, alongFromTipM: 0, sideM: 4, releaseAngleDeg: 25, chart, cautionPercent: 75 });
    expect(r.steps.map((s) => s.angleDeg)).toEqual([0, 10, 20, 25]);
    // 10°: dx = 60 (1 − cos 10°) = 0.91153 m → r = √(0.91153² + 16) = 4.1026 m → read at 5 m: 33 t; 50 kN ÷ 33 t
    expect(r.steps[1].radiusM).toBeCloseTo(Math.hypot(60 * (1 - Math.cos(Math.PI / 18)), 4), 9);
    expect(r.steps[1].share.chartRadiusM).toBe(5);
    expect(r.steps[1].share.sharePercent).toBeCloseTo((50 / tToKn(33)) * 100, 9);
    // tip height 2 + 60 sin 25° = 27.357 m
    expect(r.steps[3].tipHeightM).toBeCloseTo(2 + 60 * Math.sin((25 * Math.PI) / 180), 9);
  });
});

// ---- The planner's assist figures on the demo crane and assist crane.

const UNIT_ID = '6f1c2d3e-4a5b-4c6d-8e7f-0a1b2c3d4e5f';
const ASSIST_ID = '7a2b3c4d-5e6f-4a7b-8c9d-0e1f2a3b4c5d';

const kit = (): InventoryItem[] => demoKit('A');

const lift = (over: Partial<Configuration['assist']['lifts'][number]> = {}) => ({
  label: 'Tip section onto dollies',
  liftT: 4,
  riggingT: 0.2,
  radiusM: 9,
  hookBlockT: 0.5,
  slingsT: 0.1,
  shacklesT: 0.05,
  deductionsT: 0.3,
  legs: null,
  ...over,
});

function plan(change: (c: Configuration) => void = () => {}): Configuration {
  const c = configurationSchema.parse({
    craneUnitId: UNIT_ID,
    boomLengthM: 36,
    mainHook: { hookBlockId: 'HB120', parts: 6 },
    auxiliary: { enabled: false, hookBlockId: null },
    heaviestLoad: { description: 'Radiator bank', loadT: 40, riggingT: 1, radiusM: 12 },
    ground: { groundType: 'crushed stone', allowablePressureKpa: 400, source: { kind: 'ground_investigation', reference: 'GI R-0001' } },
    mats: { used: false, lengthM: 5, widthM: 1.2, thicknessM: 0.3, weightKg: 1500 },
    assist: {
      assistCraneId: ASSIST_ID,
      chartId: 'boom-20.5m-full-cw',
      lifts: [lift()],
      pads: { kind: 'outrigger', loadT: 26, lengthM: 1.2, widthM: 1.2, weightKg: 250 },
    },
    siteHazards: { powerLines: [], buriedServices: '', neighbours: '' },
    fallZoneMarginM: 3,
  });
  change(c);
  return configurationSchema.parse(c);
}

function run(config: Configuration): ConfigurationResults {
  return computeConfiguration(config, { arrangement: demoCrane(), inventory: kit(), assistCrane: assist });
}

function fig(r: ConfigurationResults, key: string): Figure {
  const f = r.figures.find((x) => x.key === key);
  if (!f) throw new Error(`no figure ${key}; keys: ${r.figures.map((x) => x.key).join(', ')}`);
  return f;
}

describe('assist.lift.N: the same bands as the main chart', () => {
  it('5.15 t at 9 m read at 10 m (13.0 t) → 39.7 % shown (39.62 % rounded up), pass; the form’s parts are named', () => {
    const r = run(plan());
    expect(r.assistLifts[0].sharePercent).toBeCloseTo((5.15 / 13) * 100, 9);
    const f = fig(r, 'assist.lift.0');
    expect(f).toMatchObject({ status: 'pass', value: '39.7 % (5.15 t of 13.0 t at 10 m)' });
    expect(f.detail).toMatch(/hook block 0\.5 t \+ slings 0\.1 t \+ shackles 0\.05 t \+ chart deductions 0\.3 t/);
  });

  it('9 + 0.2 + 0.5 + 0.1 + 0.05 + 0.3 = 10.15 t of 13.0 t = 78.1 % → caution, overridable', () => {
    const r = run(plan((c) => (c.assist.lifts = [lift({ liftT: 9 })])));
    expect(r.assistLifts[0].sharePercent).toBeCloseTo((10.15 / 13) * 100, 9);
    expect(fig(r, 'assist.lift.0')).toMatchObject({ status: 'caution', overridable: true });
  });

  it('a hook block entered as 0 t → caution “NOT INCLUDED”, no override until it is entered', () => {
    const r = run(plan((c) => (c.assist.lifts = [lift({ hookBlockT: 0 })])));
    expect(fig(r, 'assist.lift.0')).toMatchObject({ status: 'caution', overridable: false });
    expect(fig(r, 'assist.lift.0').detail).toMatch(/NOT INCLUDED/);
  });

  it('14 + 0.3 rigging at 9 m (14.3 ÷ 13.0 = 110 % with nothing else) → fail, never overridable; off the chart → fail', () => {
    const r = run(plan((c) => (c.assist.lifts = [lift({ liftT: 14, riggingT: 0.3, hookBlockT: 0.5 }), lift({ radiusM: 20 })])));
    expect(fig(r, 'assist.lift.0')).toMatchObject({ status: 'fail', overridable: false });
    expect(fig(r, 'assist.lift.1')).toMatchObject({ status: 'fail', overridable: false, value: 'Off the chart at 20 m' });
  });

  it('a stored lift from before these fields reads them as 0 (and so asks for the hook block)', () => {
    const old = { label: 'Old lift', liftT: 4, riggingT: 0.2, radiusM: 9 };
    const parsed = configurationSchema.parse({ ...plan(), assist: { assistCraneId: ASSIST_ID, chartId: 'boom-20.5m-full-cw', lifts: [old] } });
    expect(parsed.assist.lifts[0]).toMatchObject({ hookBlockT: 0, slingsT: 0, shacklesT: 0, deductionsT: 0, legs: null });
    expect(parsed.assist.pads.loadT).toBeNull();
    expect(parsed.assist.tandem.releaseAngleDeg).toBeNull();
  });
});

describe('assist.ground: the outrigger pads against the site’s allowable pressure, never overridable', () => {
  it('26 t + 250 kg on 1.2 m × 1.2 m = 178.8 kPa against 400 kPa → pass; against 150 kPa → fail, not overridable', () => {
    expect(fig(run(plan()), 'assist.ground')).toMatchObject({ status: 'pass', value: '178.8 kPa (allowable 400 kPa)' });
    expect(fig(run(plan((c) => (c.ground.allowablePressureKpa = 150))), 'assist.ground')).toMatchObject({ status: 'fail', overridable: false });
  });

  it('no ground source → unverified; no pad load → caution “Not included”, not overridable', () => {
    expect(fig(run(plan((c) => (c.ground.source = { kind: 'none', reference: '', designer: '' }))), 'assist.ground').status).toBe('unverified');
    const f = fig(run(plan((c) => (c.assist.pads.loadT = null))), 'assist.ground');
    expect(f).toMatchObject({ status: 'caution', overridable: false, value: 'Not included: not entered' });
  });
});

describe('assist.slings.N: two legs, centre of gravity off centre, from the hook height (slingLegTensionsFromHookHeight)', () => {
  it('the demo base section: 7.8 t, pick points 2.4 m and 3.1 m from the CoG, hook 4 m up → 5.13 t at 59.0° and 4.31 t at 52.2°', () => {
    // T1 = W·d2·S1 ÷ (H·(d1 + d2)) (the two-leg form rigging guides print): S1 = √(4² + 2.4²) = 4.6648, S2 = √(4² + 3.1²) = 5.0606
    // T1 = 7.8 × 3.1 × 4.6648 ÷ (4 × 5.5) = 5.1271 t; T2 = 7.8 × 2.4 × 5.0606 ÷ (4 × 5.5) = 4.3061 t
    const r = run(plan((c) => (c.assist.lifts = [lift({ liftT: 7.8, riggingT: 0, radiusM: 6, legs: { toCogAM: 2.4, toCogBM: 3.1, hookHeightM: 4, legRatedLoadT: 8 } })])));
    expect(fig(r, 'assist.slings.0')).toMatchObject({ status: 'pass', value: 'leg A 5.13 t at 59.0°, leg B 4.31 t at 52.2°' });
    const tight = run(plan((c) => (c.assist.lifts = [lift({ liftT: 7.8, riggingT: 0, radiusM: 6, legs: { toCogAM: 2.4, toCogBM: 3.1, hookHeightM: 4, legRatedLoadT: 5 } })])));
    expect(fig(tight, 'assist.slings.0')).toMatchObject({ status: 'fail', overridable: false });
  });

  it('a leg flatter than 30° from horizontal (hook 1 m over a pick point 3.1 m out: 17.88°, shown rounded down to 17.8°) → fail naming the leg', () => {
    const r = run(plan((c) => (c.assist.lifts = [lift({ legs: { toCogAM: 2.4, toCogBM: 3.1, hookHeightM: 1, legRatedLoadT: null } })])));
    expect(fig(r, 'assist.slings.0')).toMatchObject({ status: 'fail', overridable: false });
    expect(fig(r, 'assist.slings.0').value).toMatch(/B at 17\.8°/);
  });

  it('no legs entered → one information line, the rigger checks the tags', () => {
    expect(fig(run(plan()), 'assist.slings')).toMatchObject({ status: 'info', value: 'Not planned here' });
  });
});

describe('assist.tandem.N: the 78 m boom must have its tip carried while it leaves the ground (demo data)', () => {
  const tandem = (releaseAngleDeg: number) => (c: Configuration) => {
    c.boomLengthM = 78;
    c.heaviestLoad.radiusM = 20;
    c.assist.chartId = 'boom-11.6m-full-cw';
    c.assist.tandem = { alongFromTipM: 3, sideM: 3, releaseAngleDeg, hookBlockT: 0.6, slingsT: 0.2, shacklesT: 0.1, deductionsT: 0 };
  };
  // At the tip: sections 13.838 t (Σ w·x ÷ 78 m, worked above) + HB120 2.7 t + guy lines 2×285 + 10×505 + 2×125 + 2×220 = 6,310 kg
  // (taken whole at the tip) + the assist crane's hook 0.6 + slings 0.2 + shackles 0.1 = 23.748 t
  const total = 13.838 + 2.7 + 6.31 + 0.9;

  it('released at 5°: steps at 0° and 5°, each read against the assist chart at its radius, each saying it is a tandem lift', () => {
    const r = run(plan(tandem(5)));
    // 0°: √(3² + 3²) = 4.243 m → 5 m row 33 t; 5°: dx = 78(1 − cos 5°) − 3 = −2.7032 → √(2.7032² + 3²) = 4.038 m → 5 m row 33 t
    expect(r.tandem!.map((s) => s.angleDeg)).toEqual([0, 5]);
    expect(r.tandem![1].radiusM).toBeCloseTo(Math.hypot(78 * (1 - Math.cos((5 * Math.PI) / 180)) - 3, 3), 9);
    for (const [i, step] of r.tandem!.entries()) {
      expect(step.sharePercent! / ((total / 33) * 100)).toBeCloseTo(1, 4);
      const f = fig(r, `assist.tandem.${i}`);
      expect(f.status).toBe('pass'); // 71.96 % ≤ 75 %
      expect(f.value).toContain(`of 33.0 t at ${step.radiusM.toFixed(1)} m`);
      expect(f.detail).toMatch(/TANDEM LIFT/);
    }
    // the tip at 5°: foot pin 2.6 m up (demo data) + 78 sin 5° = 9.40 m
    expect(r.tandem![1].tipHeightM).toBeCloseTo(2.6 + 78 * Math.sin((5 * Math.PI) / 180), 9);
    expect(fig(r, 'assist.tandem.1').detail).toMatch(/steps stop at 5°/);
  });

  it('released at 20°: the tip is 16.1 m up at 10°, beyond the 11.6 m boom’s rough reach √(11.6² − 3.51²) = 11.1 m → fail, never overridable', () => {
    const r = run(plan(tandem(20)));
    expect(r.tandem!.map((s) => s.angleDeg)).toEqual([0, 10, 20]);
    expect(fig(r, 'assist.tandem.0').status).toBe('pass');
    for (const k of ['assist.tandem.1', 'assist.tandem.2']) expect(fig(r, k)).toMatchObject({ status: 'fail', overridable: false });
    expect(fig(r, 'assist.tandem.1').value).toMatch(/out of reach: the assist crane’s 11\.6 m boom reaches about 11\.1 m up/);
  });

  it('with the caution share at 70 % the 0° step (72.0 %) needs care and may be overridden; 6 m to the side it is off its share (103 %)', () => {
    expect(fig(run(plan((c) => (tandem(5)(c), (c.chartCautionPercent = 70)))), 'assist.tandem.0')).toMatchObject({ status: 'caution', overridable: true });
    // along −3, side 6: √(3² + 6²) = 6.708 m → 7 m row 23.0 t: 23.748 ÷ 23.0 = 103.3 %
    const far = run(plan((c) => (tandem(5)(c), (c.assist.tandem.alongFromTipM = -3), (c.assist.tandem.sideM = 6))));
    expect(fig(far, 'assist.tandem.0')).toMatchObject({ status: 'fail', overridable: false });
  });

  it('not planned → fail, never overridable; no assist crane → the chart fails', () => {
    const r = run(plan((c) => (tandem(5)(c), (c.assist.tandem.releaseAngleDeg = null))));
    expect(fig(r, 'assist.tandem')).toMatchObject({ status: 'fail', overridable: false, value: 'Not planned' });
    const none = run(plan((c) => (tandem(5)(c), (c.assist = { ...c.assist, assistCraneId: null, chartId: null, lifts: [] }))));
    expect(fig(none, 'assist.chart')).toMatchObject({ status: 'fail', overridable: false });
  });

  it('a boom that needs no tip support (36 m) has no tandem figures', () => {
    expect(run(plan()).figures.some((f) => f.key.startsWith('assist.tandem'))).toBe(false);
  });
});
