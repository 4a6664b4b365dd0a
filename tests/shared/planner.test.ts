// The configuration planner checked against hand calculations written out here, each naming the
// published form it follows. The crane and assist-crane data are the invented demo data; the
// inventory is a full demo kit built below (the same kit the demo seed gives unit FL-07).
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { computeConfiguration } from '../../shared/planner';
import type { ConfigurationResults } from '../../shared/planner';
import type { InventoryItem } from '../../shared/schemas/arrangement';
import { configurationSchema, figureSchema, type Configuration, type Figure } from '../../shared/schemas/configuration';
import { allNumbers, demoAssistCrane, demoCrane, relErr } from './helpers';

const crane = demoCrane();
const assistCrane = demoAssistCrane();
const G = 9.80665; // kN per tonne-force, exact by definition (3rd CGPM, 1901)

/** The full demo kit: every section, guy line and hook block a 90 m boom needs, all serviceable. */
function fullKit(overrides: Partial<Record<string, InventoryItem['status']>> = {}): InventoryItem[] {
  const kit: [InventoryItem['kind'], string, number][] = [
    ['section', 'base', 1],
    ['section', 'ins3', 1],
    ['section', 'ins6', 1],
    ['section', 'ins12', 6],
    ['section', 'tip', 1],
    ['guy_line', 'GT', 2],
    ['guy_line', 'GB', 2],
    ['guy_line', 'G3', 2],
    ['guy_line', 'G6', 2],
    ['guy_line', 'G12', 12],
    ['hook_block', 'HB250', 1],
    ['hook_block', 'HB120', 1],
    ['hook_block', 'BALL12', 1],
    ['rope', 'R28-hoist', 2],
    ['rope', 'R22-boom', 1],
  ];
  const items: InventoryItem[] = [];
  for (const [kind, typeId, count] of kit) {
    for (let n = 1; n <= count; n += 1) {
      const serial = `T-${typeId.toUpperCase()}-${String(n).padStart(2, '0')}`;
      items.push({ serial, kind, typeId, status: overrides[serial] ?? 'serviceable' });
    }
  }
  return items;
}

const UNIT_ID = '6f1c2d3e-4a5b-4c6d-8e7f-0a1b2c3d4e5f';
const ASSIST_ID = '7a2b3c4d-5e6f-4a7b-8c9d-0e1f2a3b4c5d';

/** A plan that passes: 36 m boom, HB120 on 6 parts, 40 t + 1 t rigging at 12 m, ground 260 kPa from a GI report. */
function basePlan(): Configuration {
  return configurationSchema.parse({
    craneUnitId: UNIT_ID,
    boomLengthM: 36,
    mainHook: { hookBlockId: 'HB120', parts: 6 },
    auxiliary: { enabled: false, hookBlockId: null },
    heaviestLoad: { description: 'Transformer radiator bank', loadT: 40, riggingT: 1, radiusM: 12 },
    ground: { groundType: 'Compacted crushed stone over stiff clay', allowablePressureKpa: 260, source: { kind: 'ground_investigation', reference: 'GI report R-0001 rev A' } },
    mats: { used: false, lengthM: 5, widthM: 1.2, thicknessM: 0.3, weightKg: 1500 },
    assist: { assistCraneId: ASSIST_ID, chartId: 'boom-20.5m-full-cw', lifts: [{ label: 'Tip section onto dollies', liftT: 4, riggingT: 0.2, radiusM: 9 }] },
    siteHazards: { powerLines: [{ label: '33 kV overhead line, east fence', voltageKv: 33, distanceM: 50, assistDistanceM: 40 }], buriedServices: '', neighbours: '' },
    fallZoneMarginM: 3,
  });
}

function plan(change: (c: Configuration) => void): Configuration {
  const c = basePlan();
  change(c);
  return configurationSchema.parse(c);
}

function run(config: Configuration, inventory: InventoryItem[] = fullKit()): ConfigurationResults {
  return computeConfiguration(config, { arrangement: crane, inventory, assistCrane });
}

function fig(r: ConfigurationResults, key: string): Figure {
  const f = r.figures.find((x) => x.key === key);
  if (!f) throw new Error(`no figure ${key}; keys: ${r.figures.map((x) => x.key).join(', ')}`);
  return f;
}

function loadCase(r: ConfigurationResults, key: string) {
  const c = r.loadCases.find((x) => x.key === key);
  if (!c) throw new Error(`no load case ${key}`);
  return c;
}

describe('a plan that passes (36 m, HB120 × 6 parts, 41 t at 12 m)', () => {
  const r = run(basePlan());

  it('has no failing figure, every figure carries a rule, and the keys are unique', () => {
    expect(r.figures.filter((f) => f.status === 'fail')).toEqual([]);
    for (const f of r.figures) {
      expect(figureSchema.parse(f)).toEqual(f);
      expect(f.rule.length).toBeGreaterThan(10);
    }
    const keys = r.figures.map((f) => f.key);
    expect(new Set(keys).size).toBe(keys.length);
  });

  it('boom: the 36 m make-up from the arrangement data, its weight and pins', () => {
    expect(fig(r, 'boom.makeup').status).toBe('pass');
    expect(r.makeup.sections.map((s) => s.typeId)).toEqual(['base', 'ins12', 'ins6', 'ins3', 'tip']);
    // 7,800 + 3,500 + 1,950 + 1,150 + 4,100 = 18,500 kg (demo arrangement data)
    expect(fig(r, 'boom.sectionWeight').value).toMatch(/^18\.50 t/);
    // joints: 4 × 4 pins = 16; guy lines: GT 2×2 + (G12, G6, G3, GB) 2×1 each = 4 + 8 = 12
    expect(fig(r, 'boom.pins').value).toBe('28 pins (16 in joints, 12 in guy lines)');
    expect(fig(r, 'boom.counterweight').value).toBe('85.0 t');
    expect(fig(r, 'boom.trackGauge').value).toBe('7 m');
    expect(fig(r, 'boom.plates').value).toBe('Not required'); // 36 m < 66 m threshold
    expect(r.platesRequired).toBe(false);
    expect(fig(r, 'boom.guyLines').status).toBe('info');
    // cos θ = 12 / 36 → θ = 70.53° (boom foot at the slewing centre, a simplification named in the rule)
    expect(fig(r, 'boom.radius').value).toBe('70.5° at 12 m radius');
    expect(fig(r, 'boom.radius').rule).toMatch(/simplification/);
  });

  it('lead-line pull per the Pipeline Rules of Thumb Handbook / Wire Rope Users Manual form', () => {
    // Hook load = (40 t + 1 t + HB120 2.7 t) × 9.80665 = 43.7 × 9.80665 = 428.5506 kN
    // Load sheaves have rolling bearings → E = 0.962 (Pipeline Rules of Thumb Handbook, roller bearing 96.2 %)
    // MA = E(1 − E⁶)/(1 − E): E² = 0.925444, E⁶ = 0.792593 → 0.962 × 0.207407 / 0.038 = 5.250663
    // Two idler sheaves in the data → ÷ E² = ÷ 0.925444
    // pull = 428.5506 / 5.250663 / 0.925444 = 88.194 kN  (≤ 150 kN permissible, demo drum data)
    expect(r.reeving).not.toBeNull();
    expect(r.reeving!.sheaveEfficiency).toBe(0.962);
    expect(r.reeving!.extraLeadSheaves).toBe(2);
    expect(relErr(r.reeving!.leadLinePullKn, 88.194)).toBeLessThan(1e-4);
    expect(fig(r, 'rope.leadLinePull').status).toBe('pass');
    expect(fig(r, 'rope.leadLinePull').value).toBe('88.2 kN of 150 kN permissible');
    expect(fig(r, 'rope.leadLinePull').rule).toMatch(/Pipeline Rules of Thumb/);
    // Required parts: 3 parts → MA = 0.962(1 − 0.890277)/0.038 = 2.77774, pull = 428.5506/2.77774/0.925444 = 166.7 kN > 150;
    // 4 parts → MA = 0.962(1 − 0.856447)/0.038 = 3.63414, pull = 127.4 kN ≤ 150 → 4 parts
    expect(r.reeving!.requiredParts).toBe(4);
    expect(fig(r, 'rope.requiredParts').value).toBe('at least 4 parts (127.4 kN)');
  });

  it('design factor per ASME B30.5 §5-1.7.1: 760 kN ÷ 88.194 kN = 8.617 ≥ 5 (rotation-resistant rope)', () => {
    const f = fig(r, 'rope.designFactor');
    expect(f.status).toBe('pass');
    expect(f.value).toBe('8.62 (at least 5)');
    expect(f.rule).toMatch(/ASME B30\.5/);
  });

  it('D/d per ASME B30.5 §5-1.7.4: drum 640/28 = 22.9 ≥ 18; hook block 560/28 = 20.0 ≥ 16', () => {
    expect(fig(r, 'rope.dOverD.drum').value).toBe('22.9 (640 mm ÷ 28 mm; at least 18)');
    expect(fig(r, 'rope.dOverD.hookBlock').value).toBe('20.0 (560 mm ÷ 28 mm; at least 16)');
    expect(fig(r, 'rope.dOverD.drum').status).toBe('pass');
  });

  it('wraps on the drum (two-wrap minimum, ASME B30.5; Cal/OSHA Title 8 §4929)', () => {
    // paid out = 6 parts × 36 m + 36 m lead = 252 m; circumference π × 0.640 = 2.01062 m
    // wraps left = (640 − 252) / 2.01062 = 192.97; needed = 252 + 2 × 2.01062 = 256.02 m
    expect(fig(r, 'rope.wraps').value).toBe('193.0 wraps (at least 2)');
    expect(fig(r, 'rope.lengthRequired').value).toBe('256.0 m of 640 m on the drum');
  });

  it('ground, raising: eccentric footing per Das, e ≤ L/6 → q = P/(BL)(1 + 6e/L)', () => {
    // Boom CoG from the foot = Σ w·x / Σ w:
    //   base 7,800 × 3.4 + ins12 3,500 × (8 + 6) + ins6 1,950 × (20 + 3) + ins3 1,150 × (26 + 1.5) + tip 4,100 × (29 + 4.1)
    //   = 26,520 + 49,000 + 44,850 + 31,625 + 135,710 = 287,705 kg·m ÷ 18,500 kg = 15.5516 m
    // V = 152 + 85 + 18.5 + 2.7 = 258.2 t → × 9.80665 = 2,532.077 kN
    // M = 152 × (−0.4) + 85 × (−6.1) + 18.5 × 15.5516 + 2.7 × 36 = −60.8 − 518.5 + 287.705 + 97.2 = −194.395 t·m → −1,906.36 kN·m
    // e = −194.395 / 258.2 = −0.75289 m (< L/6 = 1.5333); per track 1,266.04 kN on B·L = 1.2 × 9.2 = 11.04 m²
    // q_max = 1,266.04 / 11.04 × (1 + 6 × 0.75289 / 9.2) = 114.677 × 1.49101 = 170.99 kPa
    const c = loadCase(r, 'raising');
    expect(relErr(c.verticalLoadKn, 258.2 * G)).toBeLessThan(1e-12);
    expect(relErr(c.momentKnm, -1906.364)).toBeLessThan(1e-5);
    expect(c.track.distribution).toBe('trapezoidal');
    expect(relErr(c.track.maxPressureKpa, 170.985)).toBeLessThan(1e-5);
    expect(fig(r, 'ground.raising').status).toBe('pass');
    expect(fig(r, 'ground.raising').rule).toMatch(/Das/);
    expect(fig(r, 'ground.raising').rule).toMatch(/boom foot taken at the slewing centre \(simplification\)/);
  });

  it('ground, heaviest lift over the end and over the side (Das; two-track split)', () => {
    // Boom CoG out = 15.5516 × cos θ = 15.5516 × 12/36 = 5.18387 m
    // M = −60.8 − 518.5 + 18.5 × 5.18387 + 2.7 × 12 + 41 × 12 = −579.3 + 95.9016 + 32.4 + 492 = 41.0016 t·m → 402.089 kN·m
    // V = 258.2 + 41 = 299.2 t → 2,934.150 kN; e = 41.0016 / 299.2 = 0.13704 m
    // over the end: q_max = 1,467.075 / 11.04 × (1 + 6 × 0.13704 / 9.2) = 132.887 × 1.089374 = 144.764 kPa
    const end = loadCase(r, 'overEnd');
    expect(relErr(end.verticalLoadKn, 2934.15)).toBeLessThan(1e-6);
    expect(relErr(end.momentKnm, 402.089)).toBeLessThan(1e-5);
    expect(relErr(end.track.maxPressureKpa, 144.764)).toBeLessThan(1e-5);
    // over the side: heavier track = V/2 + M/gauge = 1,467.075 + 402.089 / 7.0 = 1,524.516 kN, uniform: ÷ 11.04 = 138.090 kPa
    const side = loadCase(r, 'overSide');
    expect(side.track.distribution).toBe('uniform');
    expect(relErr(side.track.loadPerTrackKn, 1524.516)).toBeLessThan(1e-6);
    expect(relErr(side.track.maxPressureKpa, 138.09)).toBeLessThan(1e-5);
    expect(fig(r, 'ground.overSide').rule).toMatch(/V\/2 \+ M\/gauge/);
  });

  it('ground, unloaded: e > L/6 → q_max = 2P / (3B(L/2 − e)) (Das)', () => {
    // M = −579.3 + 95.9016 + 32.4 = −450.998 t·m; e = −450.998 / 258.2 = −1.74670 m (> L/6 = 1.5333)
    // q_max = 2 × 1,266.04 / (3 × 1.2 × (4.6 − 1.74670)) = 2,532.08 / 10.2719 = 246.51 kPa (≤ 260)
    const c = loadCase(r, 'unloaded');
    expect(c.track.distribution).toBe('triangular');
    expect(c.track.partialContact).toBe(true);
    expect(relErr(c.track.maxPressureKpa, 246.506)).toBeLessThan(1e-5);
    expect(fig(r, 'ground.unloaded').status).toBe('pass');
  });

  it('assist lift: 4.2 t at 9 m read at 10 m (13.0 t) → 32.3 % (common practice, no source; the chart governs)', () => {
    // (4.0 + 0.2) / 13.0 = 0.32308 → 32.3 %
    expect(r.assistLifts[0].chartRadiusM).toBe(10);
    expect(r.assistLifts[0].sharePercent).toBeCloseTo(32.308, 3);
    expect(fig(r, 'assist.lift.0').status).toBe('pass');
  });

  it('site: fall zone 1.4 (foot) + 36 + 3 = 40.4 m; 33 kV without the owner’s confirmation needs the 20 ft default = 6.096 m (29 CFR 1926.1408, from memory); 50 − 42.4 = 7.6 m available', () => {
    // Reach: foot 1.4 m ahead of the slewing centre (demo data) + 36 m boom + 3 m hook, load and
    // tag lines + 2 m sway (default settings, common practice, no source) = 42.4 m.
    expect(r.fallZoneRadiusM).toBeCloseTo(40.4, 9);
    expect(fig(r, 'site.fallZone').status).toBe('info');
    expect(r.powerLines[0].requiredClearanceM).toBeCloseTo(6.096, 9);
    expect(r.powerLines[0].reachM).toBeCloseTo(42.4, 9);
    expect(r.powerLines[0].availableClearanceM).toBeCloseTo(7.6, 9);
    expect(r.powerLines[0].basis).toBe('default');
    expect(fig(r, 'powerLine.0').status).toBe('pass');
    expect(fig(r, 'powerLine.0').value).toBe('7.6 m available, 6.10 m required (20 ft default, up to 350 kV; 33 kV)');
    expect(fig(r, 'powerLine.0').rule).toMatch(/1926\.1408.*from memory/);
    expect(fig(r, 'powerLine.0').rule).toMatch(/common practice, no source/);
    // The assist crane (20.5 m boom + 2 m foot and head allowance + 3 + 2 = 27.5 m) 40 m from the line: 12.5 m.
    expect(r.powerLines[0].assist).toMatchObject({ distanceM: 40, pass: true });
    expect(r.powerLines[0].assist?.availableClearanceM).toBeCloseTo(12.5, 9);
    expect(fig(r, 'powerLine.0.assist').status).toBe('pass');
  });

  it('wind: the assembly and raising limits for 36 m from the data', () => {
    expect(fig(r, 'wind.assembly').value).toBe('gust ≤ 13 m/s, mean ≤ 9 m/s (usually the 3-second gust at the boom’s highest point)');
    expect(fig(r, 'wind.raising').status).toBe('info');
    expect(r.windLimits).toEqual({ assembly: { gustMs: 13, meanMs: 9 }, raising: { gustMs: 13, meanMs: 9 } });
  });
});

describe('failures and what may be overridden', () => {
  it('a quarantined insert → the boom cannot be built, not overridable, the serial named', () => {
    const r = run(basePlan(), fullKit({ 'T-INS6-01': 'quarantined' }));
    const f = fig(r, 'boom.makeup');
    expect(f.status).toBe('fail');
    expect(f.overridable).toBe(false);
    expect(f.detail).toMatch(/ins6.*quarantined: T-INS6-01/);
  });

  it('a length the data does not list → boom failure, not overridable; ground and wind cannot be computed', () => {
    const r = run(plan((c) => (c.boomLengthM = 33)));
    expect(fig(r, 'boom.makeup')).toMatchObject({ status: 'fail', overridable: false, value: '33 m is not a listed length' });
    expect(fig(r, 'ground.overEnd')).toMatchObject({ status: 'fail', overridable: false });
    expect(fig(r, 'wind.raising')).toMatchObject({ status: 'fail', overridable: false });
    expect(r.windLimits).toBeNull();
  });

  it('too few parts: 2 parts → design factor 3.10 < 5 (ASME B30.5), not overridable; nor is the pull above the drum’s permissible line pull (a winch rating)', () => {
    // MA = E(1 − E²)/(1 − E) = E(1 + E) = 0.962 × 1.962 = 1.887444
    // pull = 428.5506 / 1.887444 / 0.925444 = 245.345 kN; design factor = 760 / 245.345 = 3.098
    const r = run(plan((c) => (c.mainHook.parts = 2)));
    expect(relErr(r.reeving!.leadLinePullKn, 245.345)).toBeLessThan(1e-5);
    expect(fig(r, 'rope.designFactor')).toMatchObject({ status: 'fail', overridable: false, value: '3.10, below 5' });
    expect(fig(r, 'rope.leadLinePull')).toMatchObject({ status: 'fail', overridable: false });
  });

  it('more parts than the block takes → not overridable', () => {
    const r = run(plan((c) => (c.mainHook.parts = 12)));
    expect(fig(r, 'rope.hookBlock')).toMatchObject({ status: 'fail', overridable: false });
  });

  it('a power line too close → not overridable; the reach counts the boom foot, the auxiliary sheave, the hook, load, tag lines and sway', () => {
    const line = (label: string, voltageKv: number | null, distanceM: number, confirmed = false) =>
      ({ label, voltageKv, distanceM, voltageConfirmedByOwner: confirmed, encroachmentPreventionInPlace: confirmed, assistDistanceM: 100 });
    const r = run(
      plan((c) => {
        c.auxiliary = { enabled: true, hookBlockId: 'HB250' };
        c.siteHazards.powerLines = [line('33 kV line', 33, 49.9), line('33 kV line, owner-confirmed', 33, 47, true), line('Unknown line', null, 58), line('400 kV line', 400, 60)];
      }),
    );
    // Reach 1.4 (foot, demo data) + 36 + 1.5 (auxiliary sheave, demo data) + 3 + 2 (default allowances,
    // common practice, no source) = 43.9 m. Minimum distances per 29 CFR 1926.1407-1409 (from memory).
    // 33 kV at 49.9 m: 6.0 m left < 20 ft = 6.096 m → fails (the old Table A-only rule passed it at 12.4 m).
    expect(r.powerLines[0].availableClearanceM).toBeCloseTo(6, 9);
    expect(fig(r, 'powerLine.0')).toMatchObject({ status: 'fail', overridable: false });
    // Owner-confirmed with encroachment prevention: Table A 10 ft = 3.048 m, 3.1 m left → passes.
    expect(r.powerLines[1]).toMatchObject({ basis: 'table_a', pass: true });
    expect(r.powerLines[1].requiredClearanceM).toBeCloseTo(3.048, 9);
    // Voltage unknown: 50 ft = 15.24 m; 58 − 43.9 = 14.1 m → fails.
    expect(r.powerLines[2]).toMatchObject({ basis: 'default_unknown_voltage', pass: false });
    expect(r.powerLines[2].requiredClearanceM).toBeCloseTo(15.24, 9);
    expect(fig(r, 'powerLine.2')).toMatchObject({ status: 'fail', overridable: false });
    expect(fig(r, 'powerLine.2').value).toMatch(/14\.1 m available, 15\.24 m required \(50 ft, voltage unknown; voltage unknown\)/);
    // 400 kV: 50 ft default over 350 kV; 60 − 43.9 = 16.1 m → passes.
    expect(r.powerLines[3]).toMatchObject({ basis: 'default', pass: true });
    expect(r.powerLines[3].requiredClearanceM).toBeCloseTo(15.24, 9);
    // fall zone with the auxiliary sheave: 1.4 + 36 + 1.5 + 3 = 41.9 m
    expect(r.fallZoneRadiusM).toBeCloseTo(41.9, 9);
  });

  it('a 110 % assist lift → not overridable; off the chart → not overridable', () => {
    // chart boom-20.5m at 9 m is read at 10 m: 13.0 t; 14.0 + 0.3 = 14.3 t → 14.3 / 13.0 = 110.0 %
    const r = run(
      plan((c) => {
        c.assist.lifts = [
          { label: 'Base section', liftT: 14, riggingT: 0.3, radiusM: 9 },
          { label: 'Far lift', liftT: 1, riggingT: 0, radiusM: 20 },
        ];
      }),
    );
    expect(r.assistLifts[0].sharePercent).toBeCloseTo(110, 9);
    expect(fig(r, 'assist.lift.0')).toMatchObject({ status: 'fail', overridable: false });
    expect(fig(r, 'assist.lift.1')).toMatchObject({ status: 'fail', overridable: false, value: 'Off the chart at 20 m' });
  });

  it('no assist crane and no lifts → one info figure', () => {
    const r = run(plan((c) => (c.assist = { assistCraneId: null, chartId: null, lifts: [] })));
    expect(fig(r, 'assist.none')).toMatchObject({ status: 'info', value: 'No assist-crane lifts planned' });
    expect(r.assistLifts).toEqual([]);
  });

  it('high ground pressure → fail, never overridable: mats or a temporary-works design change the figures, not an override', () => {
    // allowable 140 kPa: raising 171.0, over the end 144.8, unloaded 246.5 kPa all exceed it; over the side 138.1 does not
    const r = run(plan((c) => (c.ground.allowablePressureKpa = 140)));
    for (const k of ['ground.raising', 'ground.overEnd', 'ground.unloaded']) expect(fig(r, k)).toMatchObject({ status: 'fail', overridable: false });
    expect(fig(r, 'ground.overSide').status).toBe('pass');
  });

  it('a load past tipping → the resultant falls outside the tracks, not overridable', () => {
    // 200 t at 30 m: M ≈ −579.3 + 18.5 × 15.55 × 30/36 + (200 + 1 + 4.9) × 30 ≈ 5,837 t·m on V ≈ 462 t → e ≈ 12.6 m > L/2 = 4.6 m
    const r = run(
      plan((c) => {
        c.mainHook = { hookBlockId: 'HB250', parts: 18 };
        c.heaviestLoad = { ...c.heaviestLoad, loadT: 200, radiusM: 30 };
      }),
    );
    for (const k of ['ground.overEnd', 'ground.overSide']) {
      expect(fig(r, k)).toMatchObject({ status: 'fail', overridable: false, value: 'Overturns' });
      expect(fig(r, k).detail).toMatch(/the resultant falls outside the tracks/);
    }
    expect(r.loadCases.map((c) => c.key)).toEqual(['raising', 'unloaded']);
  });

  it('no ground source → unverified, never pass', () => {
    const r = run(plan((c) => (c.ground.source = { kind: 'none', reference: '' })));
    for (const k of ['ground.raising', 'ground.overEnd', 'ground.overSide', 'ground.unloaded']) expect(fig(r, k).status).toBe('unverified');
    expect(r.figures.some((f) => f.group === 'ground' && f.status === 'pass')).toBe(false);
  });

  it('mats lower the pressure: 0.3 m mats spread the 1.2 m shoe to 1.8 m (45°, common practice, no source)', () => {
    // over the end, the mat under the heavy end carries 1.2 m of the trapezoid:
    //   q(0) = 144.764, q_min = 132.887 × (1 − 0.089374) = 121.011, q(1.2) = 144.764 − (144.764 − 121.011) × 1.2/9.2 = 141.666 kPa
    //   load = 1.2 × 1.2 × (144.764 + 141.666)/2 = 206.23 kN on 1.2 × (1.2 + 2 × 0.3) = 2.16 m² → 95.48 kPa
    //   mat weight 1,500 kg × 9.80665 / (1.2 × 5) = 2.452 kPa → 97.93 kPa
    const r = run(plan((c) => (c.mats.used = true)));
    const end = loadCase(r, 'overEnd');
    expect(end.mats).not.toBeNull();
    expect(relErr(end.mats!.pressureKpa, 97.93)).toBeLessThan(2e-4);
    for (const c of r.loadCases) expect(c.mats!.pressureKpa).toBeLessThan(c.track.maxPressureKpa);
    expect(fig(r, 'ground.overEnd').label).toMatch(/without mats/);
    expect(fig(r, 'ground.overEnd.mats').label).toMatch(/with mats/);
    // with 200 kPa allowable the unloaded case fails bare (246.5) but passes on mats
    const r2 = run(plan((c) => ((c.mats.used = true), (c.ground.allowablePressureKpa = 200))));
    expect(fig(r2, 'ground.unloaded').status).toBe('fail');
    expect(fig(r2, 'ground.unloaded.mats').status).toBe('pass');
  });

  it('mats shorter than the shoe is wide → failure naming the mat length', () => {
    const r = run(plan((c) => ((c.mats.used = true), (c.mats.lengthM = 1))));
    expect(fig(r, 'ground.overEnd.mats')).toMatchObject({ status: 'fail', overridable: false, rule: 'input refused: mats.lengthM' });
  });

  it('an auxiliary sheave on a length that does not take one → not overridable', () => {
    const r = run(plan((c) => ((c.boomLengthM = 90), (c.auxiliary = { enabled: true, hookBlockId: 'HB250' }))));
    expect(fig(r, 'boom.auxSheave')).toMatchObject({ status: 'fail', overridable: false });
    expect(fig(r, 'boom.plates').value).toBe('Plates required under the crawler ends');
  });

  it('a quarantined hook block is not at hand; an inconsistent inventory is a failure, not a throw', () => {
    const r = run(plan((c) => (c.mainHook = { hookBlockId: 'BALL12', parts: 1 })), fullKit({ 'T-BALL12-01': 'quarantined' }));
    expect(fig(r, 'rope.hookBlockAtHand')).toMatchObject({ status: 'fail', overridable: false });
    const dup = [...fullKit(), { serial: 'T-BASE-01', kind: 'section', typeId: 'base', status: 'serviceable' } as const];
    const r2 = run(basePlan(), dup);
    expect(fig(r2, 'boom.makeup')).toMatchObject({ status: 'fail', overridable: false });
    expect(fig(r2, 'boom.makeup').rule).toMatch(/inventory/);
  });

  it('wraps: a 90 m boom on 10 parts pays out 10 × 90 + 90 = 990 m of a 640 m rope → fail, never overridable (two dead wraps: ASME B30.5, from memory)', () => {
    const r = run(plan((c) => ((c.boomLengthM = 90), (c.mainHook.parts = 10))));
    expect(fig(r, 'rope.wraps')).toMatchObject({ status: 'fail', overridable: false });
  });
});

describe('determinism and robustness', () => {
  it('the same input gives identical output', () => {
    const c = plan((x) => (x.mats.used = true));
    const a = run(c);
    const b = run(structuredClone(c));
    expect(JSON.stringify(b)).toBe(JSON.stringify(a));
    expect(b).toEqual(a);
  });

  const hookIds = [...crane.hookBlocks.map((b) => b.id), 'HB999'];
  const lengths = [...crane.arrangements.map((a) => a.boomLengthM), 33, 100];
  const chartIds = [...assistCrane.charts.map((c) => c.id), 'no-such-chart'];

  const configArb = fc
    .record({
      boomLengthM: fc.constantFrom(...lengths),
      hookBlockId: fc.constantFrom(...hookIds),
      parts: fc.integer({ min: 1, max: 40 }),
      auxEnabled: fc.boolean(),
      auxHook: fc.constantFrom(...hookIds),
      loadT: fc.double({ min: 0.01, max: 600, noNaN: true }),
      riggingT: fc.double({ min: 0, max: 30, noNaN: true }),
      radiusM: fc.double({ min: 0.5, max: 120, noNaN: true }),
      allowablePressureKpa: fc.double({ min: 1, max: 2000, noNaN: true }),
      sourceKind: fc.constantFrom('ground_investigation', 'temporary_works_design', 'none') as fc.Arbitrary<'ground_investigation' | 'temporary_works_design' | 'none'>,
      matsUsed: fc.boolean(),
      matLengthM: fc.double({ min: 0.2, max: 12, noNaN: true }),
      matWidthM: fc.double({ min: 0.2, max: 12, noNaN: true }),
      matThicknessM: fc.double({ min: 0.01, max: 1, noNaN: true }),
      matWeightKg: fc.double({ min: 0, max: 20000, noNaN: true }),
      assistChosen: fc.boolean(),
      chartId: fc.constantFrom(...chartIds),
      lifts: fc.array(
        fc.record({
          liftT: fc.double({ min: 0.01, max: 80, noNaN: true }),
          riggingT: fc.double({ min: 0, max: 5, noNaN: true }),
          radiusM: fc.double({ min: 0.5, max: 40, noNaN: true }),
        }),
        { maxLength: 4 },
      ),
      powerLines: fc.array(
        fc.record({ voltageKv: fc.double({ min: 0.01, max: 1000, noNaN: true }), distanceM: fc.double({ min: 0.01, max: 500, noNaN: true }) }),
        { maxLength: 3 },
      ),
      marginM: fc.double({ min: 0, max: 50, noNaN: true }),
    })
    .map((v) =>
      configurationSchema.parse({
        craneUnitId: UNIT_ID,
        boomLengthM: v.boomLengthM,
        mainHook: { hookBlockId: v.hookBlockId, parts: v.parts },
        auxiliary: { enabled: v.auxEnabled, hookBlockId: v.auxEnabled ? v.auxHook : null },
        heaviestLoad: { description: 'load', loadT: v.loadT, riggingT: v.riggingT, radiusM: v.radiusM },
        ground: { groundType: '', allowablePressureKpa: v.allowablePressureKpa, source: { kind: v.sourceKind, reference: v.sourceKind === 'none' ? '' : 'ref' } },
        mats: { used: v.matsUsed, lengthM: v.matLengthM, widthM: v.matWidthM, thicknessM: v.matThicknessM, weightKg: v.matWeightKg },
        assist:
          v.assistChosen || v.lifts.length > 0
            ? { assistCraneId: ASSIST_ID, chartId: v.chartId, lifts: v.lifts.map((l, i) => ({ label: `Lift ${i + 1}`, ...l })) }
            : { assistCraneId: null, chartId: null, lifts: [] },
        siteHazards: { powerLines: v.powerLines.map((p, i) => ({ label: `Line ${i + 1}`, ...p })), buriedServices: '', neighbours: '' },
        fallZoneMarginM: v.marginM,
      }),
    );

  it('for any schema-valid plan from the demo choices: never throws, no NaN or Infinity, valid and unique figures', () => {
    fc.assert(
      fc.property(configArb, fc.boolean(), (config, withAssistData) => {
        const r = computeConfiguration(config, { arrangement: crane, inventory: fullKit(), assistCrane: withAssistData ? assistCrane : null });
        for (const n of allNumbers(r)) expect(Number.isFinite(n)).toBe(true);
        const keys = r.figures.map((f) => f.key);
        expect(new Set(keys).size).toBe(keys.length);
        for (const f of r.figures) {
          expect(figureSchema.safeParse(f).success).toBe(true);
          expect(f.value).not.toMatch(/NaN|Infinity/);
          if (f.status !== 'fail') expect(f.overridable).toBe(false);
        }
        // a failing ground source never reads as a pass
        if (config.ground.source.kind === 'none') expect(r.figures.some((f) => f.group === 'ground' && f.status === 'pass')).toBe(false);
      }),
      { numRuns: 300, seed: 20251202 },
    );
  });
});
