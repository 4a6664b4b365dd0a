// The hoist figures of the planner: rope paid out to the lowest hook position, every sheave at its
// own bearing's efficiency, the auxiliary and boom hoists, sheave D/d, fleet angle, and the limits
// that are never overridable. Hand calculations are written out beside each value with the
// published form they follow; the crane data is the invented demo model.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { computeConfiguration } from '../../../shared/planner/compute';
import type { ConfigurationResults } from '../../../shared/planner/types';
import { overrideReason } from '../../../shared/planner/overrides';
import type { ArrangementData, InventoryItem } from '../../../shared/schemas/arrangement';
import { arrangementDataSchema } from '../../../shared/schemas/arrangement';
import { configurationSchema, type Configuration, type Figure } from '../../../shared/schemas/configuration';
import { allNumbers, demoAssistCrane, demoCrane, readDemoJson, relErr } from '../helpers';

const G = 9.80665; // kN per tonne-force, exact by definition (3rd CGPM, 1901)
const PLAIN = 1 / 1.09; // Wire Rope Users Manual 4th ed. p. 88: × 1.09 per extra plain-bearing sheave
const ROLLING = 1 / 1.04; // same page: × 1.04 per extra anti-friction sheave

function kit(): InventoryItem[] {
  const items: InventoryItem[] = [];
  const add = (kind: InventoryItem['kind'], typeId: string, n: number) => {
    for (let i = 1; i <= n; i += 1) items.push({ serial: `R-${typeId}-${i}`, kind, typeId, status: 'serviceable' });
  };
  add('section', 'base', 1);
  add('section', 'ins3', 1);
  add('section', 'ins6', 1);
  add('section', 'ins12', 6);
  add('section', 'tip', 1);
  for (const [mark, n] of [['GT', 2], ['GB', 2], ['G3', 2], ['G6', 2], ['G12', 12]] as const) add('guy_line', mark, n);
  for (const b of ['HB160', 'HB120', 'HB45', 'BALL12']) add('hook_block', b, 1);
  add('rope', 'R28-hoist', 2);
  add('rope', 'R22-boom', 1);
  return items;
}

/** 36 m, HB120 × 6 parts, 41 t at 12 m: the planner test's passing plan. */
function plan(change: (c: Configuration) => void = () => {}): Configuration {
  const c = configurationSchema.parse({
    craneUnitId: '6f1c2d3e-4a5b-4c6d-8e7f-0a1b2c3d4e5f',
    boomLengthM: 36,
    mainHook: { hookBlockId: 'HB120', parts: 6 },
    auxiliary: { enabled: false, hookBlockId: null },
    heaviestLoad: { description: 'Radiator bank', loadT: 40, riggingT: 1, radiusM: 12 },
    ground: { groundType: 'stone', allowablePressureKpa: 400, source: { kind: 'ground_investigation', reference: 'GI R-1', designer: 'A. Person, Firm' } },
    mats: { used: false, lengthM: 5, widthM: 1.2, thicknessM: 0.3, weightKg: 1500 },
    assist: { assistCraneId: null, chartId: null, lifts: [] },
    siteHazards: { powerLines: [], buriedServices: '', neighbours: '' },
    fallZoneMarginM: 3,
  });
  change(c);
  return configurationSchema.parse(c);
}

function run(config: Configuration, arrangement: ArrangementData = demoCrane()): ConfigurationResults {
  return computeConfiguration(config, { arrangement, inventory: kit(), assistCrane: demoAssistCrane() });
}

function fig(r: ConfigurationResults, key: string): Figure {
  const f = r.figures.find((x) => x.key === key);
  if (!f) throw new Error(`no figure ${key}; keys: ${r.figures.map((x) => x.key).join(', ')}`);
  return f;
}

/** Step-by-step force balance, written independently of the code: start at the dead end with a unit tension and walk back to the drum. */
function pullByWalkingBack(loadKn: number, reevedFromLead: number[], lead: number[]): number {
  // While hoisting, the tension on the drum side of a sheave is the far side's ÷ the sheave's efficiency.
  let t = 1; // tension in the last part (next to the dead end)
  let sumParts = 0;
  for (let k = reevedFromLead.length - 1; k >= 0; k -= 1) {
    sumParts += t; // part k+1 hangs between sheave k and sheave k+1
    t /= reevedFromLead[k]; // across sheave k towards the drum
  }
  for (const e of lead) t /= e;
  return (t * loadKn) / sumParts;
}

describe('rope paid out at the lowest hook position (issue 13, point 4)', () => {
  it('a hook 20 m down a shaft pays out 6 × 20 = 120 m more and leaves 59.7 fewer wraps; a hook 10 m up leaves 29.8 more', () => {
    // circumference π × 0.640 = 2.010619 m; 120 / 2.010619 = 59.68 wraps; 60 / 2.010619 = 29.84
    // (rope paid out as parts × reeve height plus the lead: drum geometry, common practice, no source)
    const ground = run(plan()).reeving!;
    const shaft = run(plan((c) => (c.mainHook.lowestHookPositionM = -20))).reeving!;
    const high = run(plan((c) => (c.mainHook.lowestHookPositionM = 10))).reeving!;
    expect(shaft.ropePaidOutM! - ground.ropePaidOutM!).toBeCloseTo(120, 9);
    expect(ground.wrapsLeft! - shaft.wrapsLeft!).toBeCloseTo(59.68, 2);
    expect(high.wrapsLeft! - ground.wrapsLeft!).toBeCloseTo(29.84, 2);
    expect(fig(run(plan((c) => (c.mainHook.lowestHookPositionM = -20))), 'rope.wraps').detail).toMatch(/hook at -20\.0 m \(below ground\)/);
  });

  it('the foot-pin height and the drum-to-foot run are counted: 6 × 2.6 + 6.5 = 22.1 m more than the old boom-length-only figure', () => {
    // The old simplification paid out 6 × 36 + 36 = 252 m; now 6 × 38.6 + 42.5 = 274.1 m (demo data: foot 2.6 m, run 6.5 m)
    expect(run(plan()).reeving!.ropePaidOutM).toBeCloseTo(274.1, 9);
  });

  it('deep enough below ground the wraps fail and the shortfall is named: 36 m, 6 parts, hook 70 m down', () => {
    // paid out = 6 × (38.6 + 70) + 42.5 = 694.1 m > 640 m; needed with two wraps 694.1 + 4.0212 = 698.1 m → 58.1 m short
    const r = run(plan((c) => (c.mainHook.lowestHookPositionM = -70)));
    const f = fig(r, 'rope.wraps');
    expect(f).toMatchObject({ status: 'fail', overridable: false, value: '0.0 wraps, fewer than 2' });
    expect(f.detail).toMatch(/^58\.2 m of rope short/); // rounded up
  });

  it('a hook position above the tip is refused as a failing figure, never a pass or a throw', () => {
    const r = run(plan((c) => (c.mainHook.lowestHookPositionM = 45)));
    expect(fig(r, 'rope.wraps')).toMatchObject({ status: 'fail', overridable: false, rule: 'input refused: lowestHookPositionM' });
  });

  it('missing data (a version-1 model): the foot height and the run are taken at the most the data allows and said so, never as zero', () => {
    const crane = demoCrane();
    crane.machine.boomFoot = null;
    for (const d of crane.drums) d.leadToBoomFootM = null;
    const r = run(plan(), crane);
    // 6 × (30 + 36) + (100 + 36) = 532 m paid out, against 274.1 m with the data: fewer wraps, never more
    expect(r.reeving!.ropePaidOutM).toBeCloseTo(532, 9);
    expect(r.reeving!.wrapsLeft!).toBeLessThan(run(plan()).reeving!.wrapsLeft!);
    const f = fig(r, 'rope.wraps');
    expect(f.detail).toMatch(/not in the crane data: the boom foot-pin height \(taken as 30 m/);
    expect(f.detail).toMatch(/rope run from the main hoist drum to the boom foot \(taken as 100 m/);
    // and each is listed as "Not included" with what to add to the crane data
    expect(fig(r, 'rope.notIncluded.footPinHeight')).toMatchObject({ status: 'info', label: 'Not included: boom foot-pin height', value: 'Not in the crane data: 30 m taken for the rope paid out' });
    expect(fig(r, 'rope.notIncluded.leadToBoomFoot.mainHoist').value).toBe('Not in the crane data: 100 m taken');
    expect(run(plan()).figures.some((x) => x.key.startsWith('rope.notIncluded'))).toBe(false);
  });

  it('a version-1 file upgraded by the schema gives the same safe-side figures (nulls, never zeros)', () => {
    const v2 = readDemoJson('crane-model.json') as Record<string, unknown> & ArrangementData;
    const v1 = {
      ...v2,
      schemaVersion: 1,
      drums: v2.drums.map(({ leadToBoomFootM: _l, grooved: _g, firstSheave: _f, ...d }) => d),
      sheaves: v2.sheaves.map(({ hoists: _h, ...s }) => s),
      hookBlocks: v2.hookBlocks.map(({ sheaveBearing: _b, ...b }) => b),
      machine: (({ boomFoot: _f, mast: _m, ...m }) => m)(v2.machine),
    };
    const upgraded = arrangementDataSchema.parse(v1);
    expect(upgraded.sheaves.every((s) => s.hoists === null)).toBe(true);
    expect(upgraded.hookBlocks.every((b) => b.sheaveBearing === null)).toBe(true);
    expect(upgraded.drums.every((d) => d.firstSheave === null && d.grooved === null)).toBe(true);
    const withData = run(plan()).reeving!;
    const old = run(plan(), upgraded).reeving!;
    expect(old.leadLinePullKn).toBeGreaterThan(withData.leadLinePullKn);
    expect(old.wrapsLeft!).toBeLessThan(withData.wrapsLeft!);
  });
});

describe('every sheave at its own bearing (issue 13, point 5)', () => {
  it('the demo base idler is plain: the pull is 0.962 / 0.917 = 4.9 % above taking it at the rolling value', () => {
    const plainIdler = run(plan()).reeving!.leadLinePullKn;
    const crane = demoCrane();
    crane.sheaves.find((s) => s.id === 'base-idler')!.bearing = 'rolling';
    const allRolling = run(plan(), crane).reeving!.leadLinePullKn;
    expect(plainIdler / allRolling).toBeCloseTo(0.962 / 0.917, 12);
  });

  it('the planner pull equals a step-by-step force balance over the demo path (independent walk from the dead end)', () => {
    const r = run(plan()).reeving!;
    const loadKn = 43.7 * G;
    const reeved = Array.from({ length: 6 }, () => 0.962);
    expect(relErr(r.leadLinePullKn, pullByWalkingBack(loadKn, reeved, [0.962, 0.917]))).toBeLessThan(1e-12);
  });

  it('a block whose bearings the data does not give is taken as plain (the higher pull), and the figure says so', () => {
    const crane = demoCrane();
    crane.hookBlocks.find((b) => b.id === 'HB120')!.sheaveBearing = null;
    const r = run(plan(), crane);
    // reeved sheaves from the lead side: tip, block, tip, block, tip, block → 0.962, 0.917, 0.962, 0.917, 0.962, 0.917
    const expected = pullByWalkingBack(43.7 * G, [0.962, 0.917, 0.962, 0.917, 0.962, 0.917], [0.962, 0.917]);
    expect(relErr(r.reeving!.leadLinePullKn, expected)).toBeLessThan(1e-12);
    expect(fig(r, 'rope.leadLinePull').detail).toMatch(/bearings of HB120’s sheaves are not in the data: plain bearings taken/);
    expect(fig(r, 'rope.notIncluded.blockBearing').label).toBe('Not included: bearings of HB120’s sheaves');
  });

  it('sheaves whose rope the data does not name are counted on the main hoist path (the auxiliary sheave too): never less friction', () => {
    const crane = demoCrane();
    for (const s of crane.sheaves) s.hoists = null;
    const r = run(plan(), crane);
    expect(r.reeving!.leadLinePullKn).toBeGreaterThanOrEqual(run(plan()).reeving!.leadLinePullKn);
    expect(fig(r, 'rope.leadLinePull').detail).toMatch(/does not say which rope runs over tip-load, tip-guide, aux, base-idler/);
    expect(fig(r, 'rope.notIncluded.sheavePath').status).toBe('info');
  });

  it('WRUM 4th ed. p. 88 method with mixed bearings: roller 6-part factor × 1.04 (rolling guide) × 1.09 (plain idler)', () => {
    // Lead-line factor for 6 parts, anti-friction bearings: K⁶(K − 1)/(K⁶ − 1), K = 1.04 → 0.1908 (table value 0.191, from memory)
    // × 1.04 × 1.09 = 0.2163; × 428.5506 kN = 92.69 kN. With the handbook's exact factors the planner's rounded
    // presets (0.962, 0.917) land within 0.3 % of it.
    const k = 1.04;
    const factor = ((k ** 6 * (k - 1)) / (k ** 6 - 1)) * 1.04 * 1.09;
    expect(relErr(run(plan()).reeving!.leadLinePullKn, 43.7 * G * factor)).toBeLessThan(0.003);
    expect(PLAIN).toBeCloseTo(0.917, 3);
    expect(ROLLING).toBeCloseTo(0.962, 3);
  });
});

describe('the demo fleet is consistent (issue 13, "Also wrong")', () => {
  it('every hook block of the demo model carries its rating on its most parts within the main drum’s permissible pull and a design factor of 5', () => {
    const crane = demoCrane();
    for (const block of crane.hookBlocks) {
      // The heaviest lift the block is rated for, with nothing else on the hook; the shortest boom.
      const r = run(plan((c) => ((c.boomLengthM = 18), (c.mainHook.hookBlockId = block.id), (c.mainHook.parts = block.maxParts), (c.heaviestLoad.loadT = block.ratedLoadT), (c.heaviestLoad.riggingT = 0), (c.heaviestLoad.radiusM = 6))));
      expect(fig(r, 'rope.leadLinePull').status, `${block.id}: ${fig(r, 'rope.leadLinePull').value}`).toBe('pass');
      expect(fig(r, 'rope.designFactor').status, `${block.id}: ${fig(r, 'rope.designFactor').value}`).toBe('pass');
    }
  });

  it('HB160 on 18 parts: 164.9 t → 144.2 kN of 150 kN, the old 250 t rating would need 222.9 kN', () => {
    // (160 + 4.9) × 9.80665 = 1,617.116 kN; MA(18, 0.962) = 0.962(1 − 0.962¹⁸)/0.038 = 12.7107; ÷ (0.962 × 0.917) → 144.22 kN
    // 250 t: (250 + 4.9) × 9.80665 = 2,499.70 kN → 222.93 kN > 150 kN: the demo block could never have lifted its old rating
    const r = run(plan((c) => ((c.boomLengthM = 18), (c.mainHook = { hookBlockId: 'HB160', parts: 18, lowestHookPositionM: 0 }), (c.heaviestLoad.loadT = 160), (c.heaviestLoad.riggingT = 0))));
    expect(relErr(r.reeving!.leadLinePullKn, 144.22)).toBeLessThan(2e-4);
    expect(relErr(pullByWalkingBack(254.9 * G, Array.from({ length: 18 }, () => 0.962), [0.962, 0.917]), 222.93)).toBeLessThan(2e-4);
  });
});

describe('auxiliary hoist, boom hoist, sheave D/d and fleet angle ("Also wrong")', () => {
  it('auxiliary hoist with BALL12: 12.62 t on one part over the aux sheave, tip guide and plain base idler → 145.8 kN, design factor 5.21', () => {
    // 12.62 × 9.80665 = 123.760 kN ÷ (0.962 aux sheave × 0.962 guide × 0.917 idler = 0.848632) = 145.835 kN ≤ 150; 760 / 145.835 = 5.211
    const r = run(plan((c) => (c.auxiliary = { enabled: true, hookBlockId: 'BALL12' })));
    expect(fig(r, 'rope.aux.leadLinePull')).toMatchObject({ status: 'pass', value: '145.9 kN of 150 kN permissible' }); // 145.835 shown rounded up
    expect(fig(r, 'rope.aux.designFactor')).toMatchObject({ status: 'pass', value: '5.21 (at least 5)' });
    // aux drum: tip 2.6 + 36 + 1.5 = 40.1 m; paid out 40.1 + (7.5 + 36 + 1.5) = 85.1 m of 450 m → (450 − 85.1)/2.010619 = 181.49 wraps
    expect(fig(r, 'rope.aux.wraps').value).toBe('181.4 wraps (at least 2)'); // rounded down
  });

  it('an auxiliary hook rated beyond the single line fails, never overridable, naming the most the hoist can lift', () => {
    // HB45 on one part: (45 + 1.25) × 9.80665 = 453.56 kN ÷ 0.848632 = 534.5 kN > 150; most = 150 × 0.848632 / 9.80665 − 1.25 = 11.73 t
    const r = run(plan((c) => (c.auxiliary = { enabled: true, hookBlockId: 'HB45' })));
    const f = fig(r, 'rope.aux.leadLinePull');
    expect(f).toMatchObject({ status: 'fail', overridable: false });
    expect(f.detail).toMatch(/at most 11\.7 t on one part/);
  });

  it('boom-hoist rope design factor: 340 kN ÷ 80 kN (raising limit and drum rating) = 4.25 ≥ 3.5 running rope (ASME B30.5 §5-1.7.1)', () => {
    const r = run(plan());
    expect(fig(r, 'rope.boomHoist.designFactor')).toMatchObject({ status: 'pass', value: '4.25 (at least 3.5)' });
    const crane = demoCrane();
    crane.arrangements.find((a) => a.boomLengthM === 36)!.raising.limits.maxBoomHoistLinePullKn = 100;
    // the higher pull governs: 340 / 100 = 3.40 < 3.5
    expect(fig(run(plan(), crane), 'rope.boomHoist.designFactor')).toMatchObject({ status: 'fail', overridable: false, value: '3.40, below 3.5' });
  });

  it('sheave D/d (ASME B30.5 §5-1.7.4): a 500 mm idler under 28 mm hoist rope is 17.86, shown 17.8 < 18 → fail; the 420 mm mast head under 22 mm boom-hoist rope 19.09, shown 19.0 ≥ 15 (ratios rounded down)', () => {
    const crane = demoCrane();
    crane.sheaves.find((s) => s.id === 'base-idler')!.pitchDiameterMm = 500;
    const r = run(plan(), crane);
    expect(fig(r, 'rope.dOverD.sheave.base-idler')).toMatchObject({ status: 'fail', overridable: false, value: '17.8 (500 mm ÷ 28 mm; at least 18)' });
    expect(fig(r, 'rope.dOverD.sheave.mast-head')).toMatchObject({ status: 'pass', value: '19.0 (420 mm ÷ 22 mm; at least 15)' });
    // the auxiliary sheave is only checked when it is fitted
    expect(r.figures.some((f) => f.key === 'rope.dOverD.sheave.aux')).toBe(false);
  });

  it('fleet angle: demo main drum 0.45 m grooved, first sheave 6.5 m → atan(0.225/6.5) = 1.98° ≤ 2° (Wire Rope Users Manual); missing geometry → the manufacturer’s', () => {
    const r = run(plan());
    expect(fig(r, 'rope.fleetAngle.mainHoist')).toMatchObject({ status: 'pass' });
    expect(fig(r, 'rope.fleetAngle.mainHoist').value).toMatch(/^1\.99°/); // 1.983° shown rounded up
    const crane = demoCrane();
    crane.drums[0].firstSheave = { distanceM: 6.5, offsetFromDrumCentreM: 0.2 };
    crane.drums[2].firstSheave = null;
    const r2 = run(plan(), crane);
    // atan(0.425 / 6.5) = 3.74° at the far flange: outside the guidance, said plainly
    expect(fig(r2, 'rope.fleetAngle.mainHoist').value).toMatch(/^3\.75°.*outside the guidance/); // 3.74° shown rounded up
    expect(fig(r2, 'rope.fleetAngle.boomHoist')).toMatchObject({ status: 'info', value: 'The manufacturer’s design: not in the crane data' });
    expect(fig(r2, 'rope.guyLines').value).toBe('The manufacturer’s rating');
  });
});

describe('no override for line pull, wraps, D/d or design factor (issue 13, point 2; must show 2)', () => {
  it('each failing hoist limit is not overridable, and none of their keys is in the list of matters of judgement', () => {
    const crane = demoCrane();
    crane.drums[0].pitchDiameterMm = 400; // 400 / 28 = 14.3 < 18
    crane.hookBlocks.find((b) => b.id === 'HB120')!.sheavePitchDiameterMm = 400; // 14.3 < 16
    crane.sheaves.find((s) => s.id === 'tip-load')!.pitchDiameterMm = 400;
    crane.arrangements.find((a) => a.boomLengthM === 36)!.raising.limits.maxBoomHoistLinePullKn = 120;
    const r = run(
      plan((c) => {
        c.mainHook.parts = 2; // pull and design factor fail
        c.mainHook.lowestHookPositionM = -300; // wraps fail: 2 × (38.6 + 300) + 42.5 = 719.7 m > 640 m
        c.auxiliary = { enabled: true, hookBlockId: 'HB45' }; // aux pull and design factor fail
      }),
      crane,
    );
    const keys = [
      'rope.leadLinePull',
      'rope.designFactor',
      'rope.wraps',
      'rope.dOverD.drum',
      'rope.dOverD.hookBlock',
      'rope.dOverD.sheave.tip-load',
      'rope.aux.leadLinePull',
      'rope.aux.designFactor',
      'rope.boomHoist.designFactor',
    ];
    for (const key of keys) {
      expect(fig(r, key), key).toMatchObject({ status: 'fail', overridable: false });
      expect(overrideReason(key), key).toBeNull();
    }
  });
});

describe('robustness of the hoist figures', () => {
  const crane = demoCrane();
  const lengths = crane.arrangements.map((a) => a.boomLengthM);
  const blocks = crane.hookBlocks.map((b) => b.id);

  it('for any boom, block, parts, hook position and auxiliary hook: no throw, no NaN or Infinity, no rope figure overridable, and a lower hook never leaves more wraps', () => {
    fc.assert(
      fc.property(
        fc.constantFrom(...lengths),
        fc.constantFrom(...blocks),
        fc.integer({ min: 1, max: 40 }),
        fc.double({ min: -300, max: 200, noNaN: true }),
        fc.double({ min: 0, max: 50, noNaN: true }),
        fc.option(fc.constantFrom(...blocks)),
        (boomLengthM, hookBlockId, parts, lowest, deeper, aux) => {
          const config = plan((c) => {
            c.boomLengthM = boomLengthM;
            c.mainHook = { hookBlockId, parts, lowestHookPositionM: lowest };
            c.auxiliary = aux === null ? { enabled: false, hookBlockId: null } : { enabled: true, hookBlockId: aux };
          });
          const r = run(config);
          for (const n of allNumbers(r)) expect(Number.isFinite(n)).toBe(true);
          for (const f of r.figures.filter((x) => x.group === 'rope')) {
            expect(f.overridable, f.key).toBe(false);
            expect(f.value).not.toMatch(/NaN|Infinity/);
          }
          const lower = run(plan((c) => ((c.boomLengthM = boomLengthM), (c.mainHook = { hookBlockId, parts, lowestHookPositionM: Math.max(-300, lowest - deeper) }))));
          if (r.reeving?.wrapsLeft != null && lower.reeving?.wrapsLeft != null) expect(lower.reeving.wrapsLeft).toBeLessThanOrEqual(r.reeving.wrapsLeft);
        },
      ),
      // The whole configuration is computed twice a run (ground over the full slew too): few runs, a long timeout.
      { numRuns: 60, seed: 20251203 },
    );
  }, 120_000);
});
