// The main crane's own chart: reading it, the share of it a lift takes, and the weight at the tip
// for raising. The reading rules (the next LONGER listed radius, never between or beyond the
// rows) and the caution share are common practice, no source; the crane's chart governs. Chart
// values are the invented demo data; every expected share is worked out here from the data's
// rows and weights, written beside the check, and tonnes are converted by mathjs.
import { evaluate } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { chartBand, chartShare, limitShare, percentUp, readChart } from '../../../shared/calc';
import { computeConfiguration } from '../../../shared/planner/compute';
import type { ConfigurationResults } from '../../../shared/planner/types';
import type { ArrangementData, InventoryItem } from '../../../shared/schemas/arrangement';
import { configurationSchema, type Configuration, type Figure } from '../../../shared/schemas/configuration';
import { demoAssistCrane, demoCrane, expectCalcError, demoKit } from '../helpers';

const tToKn = (t: number) => evaluate(`${t} tonne * gravity`).toNumber('kN') as number;
const crane = demoCrane();
const chart36 = crane.arrangements.find((a) => a.boomLengthM === 36)!.capacityCharts[0].points; // 6 m … 30 m, 85 t counterweight

describe('readChart (common practice, no source)', () => {
  it('a listed radius reads its own row', () => {
    const r = readChart(chart36, 12);
    expect(r.covered && r.chartRadiusM).toBe(12);
    expect(r.capacityT).toBe(113.3); // demo 36 m chart: 12 m → 113.3 t
    if (r.covered) expect(r.capacityKn).toBeCloseTo(tToKn(113.3), 9);
  });

  it('between rows reads the next longer radius, never the interpolated value', () => {
    // 12.5 m lies between 12 m (113.3 t) and 14 m (90.4 t): a straight line would give 107.6 t
    const r = readChart(chart36, 12.5);
    expect(r.chartRadiusM).toBe(14);
    expect(r.capacityT).toBe(90.4);
    expect(r.capacityT).toBeLessThan(107.5);
  });

  it('shorter than the first row is not covered; beyond the last row there is no capacity', () => {
    const short = readChart(chart36, 5.99);
    expect(short.covered).toBe(false);
    if (!short.covered) expect(short.reason).toMatch(/shorter than the chart's shortest radius 6 m/);
    const far = readChart(chart36, 30.01);
    expect(far.covered).toBe(false);
    if (!far.covered) expect(far.reason).toMatch(/beyond the chart's last radius 30 m/);
  });

  it('rows given out of order are read in radius order', () => {
    const r = readChart([{ radiusM: 10, capacityT: 5 }, { radiusM: 4, capacityT: 20 }, { radiusM: 6, capacityT: 12 }], 5);
    expect([r.chartRadiusM, r.capacityT]).toEqual([6, 12]);
  });

  it('refuses a zero, negative or NaN radius and an empty chart', () => {
    expectCalcError(() => readChart(chart36, 0), 'radiusM');
    expectCalcError(() => readChart(chart36, Number.NaN), 'radiusM');
    expectCalcError(() => readChart([], 5), 'chart');
  });
});

describe('chartBand: above 100 % fails, above the site’s caution share needs care (common practice, no source)', () => {
  it.each([
    [75, 75, 'pass'],
    [75.01, 75, 'caution'],
    [100, 75, 'caution'],
    [100.01, 75, 'fail'],
    [60, 50, 'caution'],
    [100, 100, 'pass'],
  ] as const)('%s %% with the caution share at %s %% → %s', (share, caution, band) => {
    expect(chartBand(share, caution)).toBe(band);
  });

  it('a chart row with no capacity, or off the chart, always fails', () => {
    expect(chartShare({ loadKn: 1, points: [{ radiusM: 5, capacityT: 0 }], radiusM: 5, cautionPercent: 75 }).band).toBe('fail');
    expect(chartShare({ loadKn: 1, points: chart36, radiusM: 40, cautionPercent: 75 }).band).toBe('fail');
  });

  it('a limit share: 6.92 t against 8.0 t = 86.5 %, in the caution band (share of a limit and the 75 % band: common practice, no source)', () => {
    const r = limitShare({ loadKn: tToKn(6.92), limitKn: tToKn(8), cautionPercent: 75 });
    expect(r.sharePercent).toBeCloseTo(86.5, 9);
    expect(r.band).toBe('caution');
  });

  it('percentages shown round up, never down', () => {
    expect(percentUp(25.4069)).toBe('25.5');
    expect(percentUp(32.5)).toBe('32.5');
    expect(percentUp(100.001)).toBe('100.1');
  });
});

// ---- The planner: chart.lift and chart.raise on the demo crane (36 m, 85 t counterweight).

const UNIT_ID = '6f1c2d3e-4a5b-4c6d-8e7f-0a1b2c3d4e5f';
const ASSIST_ID = '7a2b3c4d-5e6f-4a7b-8c9d-0e1f2a3b4c5d';

const kit = (): InventoryItem[] => demoKit('C');

function plan(change: (c: Configuration) => void = () => {}): Configuration {
  const c = configurationSchema.parse({
    craneUnitId: UNIT_ID,
    boomLengthM: 36,
    mainHook: { hookBlockId: 'HB120', parts: 6 },
    auxiliary: { enabled: false, hookBlockId: null },
    heaviestLoad: { description: 'Transformer radiator bank', loadT: 40, riggingT: 1, radiusM: 12 },
    ground: { groundType: 'crushed stone', allowablePressureKpa: 400, source: { kind: 'ground_investigation', reference: 'GI R-0001' } },
    mats: { used: false, lengthM: 5, widthM: 1.2, thicknessM: 0.3, weightKg: 1500 },
    assist: { assistCraneId: null, chartId: null, lifts: [] },
    siteHazards: { powerLines: [], buriedServices: '', neighbours: '' },
    fallZoneMarginM: 3,
  });
  change(c);
  return configurationSchema.parse(c);
}

function run(config: Configuration, arrangement: ArrangementData = crane): ConfigurationResults {
  return computeConfiguration(config, { arrangement, inventory: kit(), assistCrane: demoAssistCrane() });
}

function fig(r: ConfigurationResults, key: string): Figure {
  const f = r.figures.find((x) => x.key === key);
  if (!f) throw new Error(`no figure ${key}; keys: ${r.figures.map((x) => x.key).join(', ')}`);
  return f;
}

/**
 * The hoist rope hanging below the tip, worked out here with Pythagoras on the demo data: the boom
 * foot 1.4 m ahead of the slewing centre and 2.6 m up, the 36 m boom's tip √(36² − (radius − 1.4)²)
 * above the foot, R28 rope at 3.8 kg/m, hook at the ground (or lower): falls × drop × 3.8 kg/m.
 */
const ropeT = (radiusM: number, falls: number, lowestM = 0) => (falls * (2.6 + Math.sqrt(36 ** 2 - (radiusM - 1.4) ** 2) - lowestM) * 3.8) / 1000;

describe('chart.lift: the heaviest lift as a share of the crane’s own chart', () => {
  it('40 t + 1 t rigging + the HB120 block (2.7 t, counted as load) + 6 falls of rope from the 37.0 m tip (0.844 t) at 12 m: 44.544 t of 113.3 t = 39.31 %, load and share shown rounded up, pass', () => {
    const r = run(plan());
    const f = fig(r, 'chart.lift');
    expect(f).toMatchObject({ status: 'pass', overridable: false, group: 'boom' });
    expect(ropeT(12, 6)).toBeCloseTo(0.8437, 4); // 6 × (2.6 + √(1296 − 112.36)) × 3.8 = 6 × 37.004 × 3.8 kg
    expect(r.chart!.lift!.sharePercent).toBeCloseTo(((43.7 + ropeT(12, 6)) / 113.3) * 100, 9);
    expect(f.value).toBe('39.4 % of chart (44.55 t of 113.3 t at 12 m)');
    expect(f.detail).toMatch(/main hook block HB120 2\.70 t \+ main hoist rope below the tip \(6 falls × 37\.0 m\) 0\.85 t/);
    expect(r.figures.some((x) => x.key === 'boom.loadChart')).toBe(false);
  });

  it('a hook going 20 m below ground hangs 6 × 20 m × 3.8 kg/m = 0.456 t more rope below the tip', () => {
    const r = run(plan((c) => (c.mainHook.lowestHookPositionM = -20)));
    expect(r.chart!.lift!.totalT - run(plan()).chart!.lift!.totalT).toBeCloseTo(0.456, 9);
  });

  it('a rope the data gives no mass for → caution “NOT INCLUDED”, no override until the data gives it', () => {
    const data = structuredClone(crane);
    data.ropes = data.ropes.map((x) => ({ ...x, massKgPerM: null }));
    const f = fig(run(plan(), data), 'chart.lift');
    expect(f).toMatchObject({ status: 'caution', overridable: false });
    expect(f.detail).toMatch(/main hoist rope below the tip \(6 falls × 37\.0 m\) not in the data: NOT INCLUDED/);
  });

  it('at 12.5 m the chart is read at 14 m (90.4 t), not interpolated', () => {
    const r = run(plan((c) => (c.heaviestLoad.radiusM = 12.5)));
    expect(r.chart!.lift!.chartRadiusM).toBe(14);
    expect(r.chart!.lift!.sharePercent).toBeCloseTo(((43.7 + ropeT(12.5, 6)) / 90.4) * 100, 9);
  });

  it('the auxiliary hook, sheave head and one fall of auxiliary rope hang with the load: + BALL12 0.62 t + head 1.4 t', () => {
    const r = run(plan((c) => (c.auxiliary = { enabled: true, hookBlockId: 'BALL12' })));
    expect(r.chart!.lift!.sharePercent).toBeCloseTo(((45.72 + ropeT(12, 6) + ropeT(12, 1)) / 113.3) * 100, 9);
    expect(fig(r, 'chart.lift').status).toBe('pass');
  });

  it('between the caution share and 100 %: HB160 (4.9 t) on 18 falls with 83 t + 1 t at 12 m = 91.43 ÷ 113.3 = 80.7 % → caution, overridable', () => {
    const r = run(plan((c) => ((c.mainHook = { hookBlockId: 'HB160', parts: 18, lowestHookPositionM: 0 }), (c.heaviestLoad.loadT = 83))));
    expect(r.chart!.lift!.sharePercent).toBeCloseTo(((88.9 + ropeT(12, 18)) / 113.3) * 100, 9);
    expect(fig(r, 'chart.lift')).toMatchObject({ status: 'caution', overridable: true });
    expect(fig(r, 'chart.lift').detail).toMatch(/above the site's caution share of 75 %/);
  });

  it('above 100 %: 110 t + 1 t + 4.9 t + 2.53 t of rope = 118.43 ÷ 113.3 = 104.5 % → fail, never overridable', () => {
    const r = run(plan((c) => ((c.mainHook = { hookBlockId: 'HB160', parts: 18, lowestHookPositionM: 0 }), (c.heaviestLoad.loadT = 110))));
    expect(r.chart!.lift!.sharePercent).toBeCloseTo(((115.9 + ropeT(12, 18)) / 113.3) * 100, 9);
    expect(fig(r, 'chart.lift')).toMatchObject({ status: 'fail', overridable: false });
  });

  it('the caution share is the site’s setting: 63 t + 1 t + 2.7 t + 0.84 t = 67.54 ÷ 113.3 = 59.6 % passes at 75 %, needs care at 50 %', () => {
    expect(fig(run(plan((c) => (c.heaviestLoad.loadT = 63))), 'chart.lift').status).toBe('pass');
    expect(fig(run(plan((c) => ((c.heaviestLoad.loadT = 63), (c.chartCautionPercent = 50)))), 'chart.lift').status).toBe('caution');
    expect(configurationSchema.safeParse({ ...plan(), chartCautionPercent: 49 }).success).toBe(false);
    expect(configurationSchema.safeParse({ ...plan(), chartCautionPercent: 101 }).success).toBe(false);
  });

  it('an older stored configuration without the setting takes 75 %', () => {
    const { chartCautionPercent: _dropped, ...old } = plan();
    expect(configurationSchema.parse(old).chartCautionPercent).toBe(75);
  });

  it('inside the first row (5 m < 6 m) or beyond the last (31 m > 30 m): fail, never overridable', () => {
    for (const radiusM of [5, 31]) {
      const f = fig(run(plan((c) => (c.heaviestLoad.radiusM = radiusM))), 'chart.lift');
      expect(f).toMatchObject({ status: 'fail', overridable: false, value: `Off the chart at ${radiusM} m` });
    }
  });

  it('no chart for the boom length and counterweight → fail, never overridable', () => {
    const data = structuredClone(crane);
    data.arrangements.find((a) => a.boomLengthM === 36)!.capacityCharts[0].counterweightKg = 95000;
    const f = fig(run(plan(), data), 'chart.lift');
    expect(f).toMatchObject({ status: 'fail', overridable: false, value: 'No chart for this boom length and counterweight in the data' });
  });

  it('an auxiliary head the data gives no weight for → caution “NOT INCLUDED”, no override until the data gives it', () => {
    const data = structuredClone(crane);
    data.auxSheave = null;
    const r = run(plan((c) => (c.auxiliary = { enabled: true, hookBlockId: 'BALL12' })), data);
    expect(fig(r, 'chart.lift')).toMatchObject({ status: 'caution', overridable: false });
    expect(fig(r, 'chart.lift').detail).toMatch(/auxiliary sheave head not in the data: NOT INCLUDED/);
    expect(fig(r, 'chart.raise')).toMatchObject({ status: 'caution', overridable: false });
  });
});

describe('chart.raise: what hangs at the tip for an unassisted raise against the manufacturer’s limit (36 m: 8,000 kg)', () => {
  it('HB120 alone: 2.7 ÷ 8.0 = 33.75 % → shown 33.8 %, pass', () => {
    const f = fig(run(plan()), 'chart.raise');
    expect(f).toMatchObject({ status: 'pass', value: '33.8 % (2.70 t of 8.00 t allowed)' });
  });

  it('HB160 + BALL12 + aux head: 4.9 + 0.62 + 1.4 = 6.92 t = 86.5 % → caution, overridable', () => {
    const r = run(plan((c) => ((c.mainHook = { hookBlockId: 'HB160', parts: 18, lowestHookPositionM: 0 }), (c.auxiliary = { enabled: true, hookBlockId: 'BALL12' }))));
    expect(r.chart!.raise!.sharePercent).toBeCloseTo((6.92 / 8) * 100, 9);
    expect(fig(r, 'chart.raise')).toMatchObject({ status: 'caution', overridable: true });
  });

  it('HB160 + HB120 as auxiliary + head: 4.9 + 2.7 + 1.4 = 9.0 t = 112.5 % → fail, never overridable', () => {
    const r = run(plan((c) => ((c.mainHook = { hookBlockId: 'HB160', parts: 18, lowestHookPositionM: 0 }), (c.auxiliary = { enabled: true, hookBlockId: 'HB120' }))));
    expect(r.chart!.raise!.sharePercent).toBeCloseTo(112.5, 9);
    expect(fig(r, 'chart.raise')).toMatchObject({ status: 'fail', overridable: false });
  });

  it('a limit the data does not give → unverified “not given in the data”: a manufacturer’s rating, never overridden, the data must be completed', () => {
    const data = structuredClone(crane);
    data.arrangements.find((a) => a.boomLengthM === 36)!.raising.limits.maxTipLoadKg = null;
    const f = fig(run(plan(), data), 'chart.raise');
    expect(f).toMatchObject({ status: 'unverified', overridable: false });
    expect(f.value).toMatch(/limit not given in the data/);
  });
});

describe('with an assist crane chosen the plan still reads the main chart', () => {
  it('the assist crane does not change chart.lift', () => {
    const a = run(plan());
    const b = run(plan((c) => (c.assist = { ...c.assist, assistCraneId: ASSIST_ID, chartId: 'boom-20.5m-full-cw' })));
    expect(fig(b, 'chart.lift').value).toBe(fig(a, 'chart.lift').value);
  });
});
