// The planner's site figures: power lines for the main and the assist crane, what happens when the
// crane data lacks a dimension, and what the wind limits say beside them. Distances per 29 CFR
// 1926.1407-1409 (from memory); the reach geometry and allowances are common practice, no source.
import { describe, expect, it } from 'vitest';
import { computeConfiguration } from '../../../shared/planner/compute';
import type { ConfigurationResults } from '../../../shared/planner/types';
import { configurationSchema, type Figure } from '../../../shared/schemas/configuration';
import { demoAssistCrane, demoCrane } from '../helpers';

const crane = demoCrane();
const assistCrane = demoAssistCrane();

/** A 36 m plan with one 11 kV line 60 m away and an assist crane on its 20.5 m chart. */
function plan(over: { line?: Record<string, unknown>; assist?: boolean; aux?: boolean; allowances?: Record<string, number> } = {}) {
  return configurationSchema.parse({
    craneUnitId: '6f1c2d3e-4a5b-4c6d-8e7f-0a1b2c3d4e5f',
    boomLengthM: 36,
    mainHook: { hookBlockId: 'HB120', parts: 6 },
    auxiliary: over.aux ? { enabled: true, hookBlockId: 'HB250' } : { enabled: false, hookBlockId: null },
    heaviestLoad: { description: 'Radiator bank', loadT: 20, riggingT: 1, radiusM: 12 },
    ground: { groundType: 'Stone over clay', allowablePressureKpa: 300, source: { kind: 'ground_investigation', reference: 'GI R-0001' } },
    mats: { used: false, lengthM: 5, widthM: 1.2, thicknessM: 0.3, weightKg: 1500 },
    assist:
      over.assist === false
        ? { assistCraneId: null, chartId: null, lifts: [] }
        : { assistCraneId: '7a2b3c4d-5e6f-4a7b-8c9d-0e1f2a3b4c5d', chartId: 'boom-20.5m-full-cw', lifts: [{ label: 'Tip onto dollies', liftT: 4, riggingT: 0.2, radiusM: 9 }] },
    siteHazards: { powerLines: [{ label: '11 kV feeder', voltageKv: 11, distanceM: 60, ...over.line }], buriedServices: '', neighbours: '', ...over.allowances },
    fallZoneMarginM: 5,
  });
}

function fig(r: ConfigurationResults, key: string): Figure {
  const f = r.figures.find((x) => x.key === key);
  if (!f) throw new Error(`no figure ${key}; keys: ${r.figures.map((x) => x.key).join(', ')}`);
  return f;
}

const run = (config: ReturnType<typeof plan>, arrangement = crane, assist = assistCrane) => computeConfiguration(config, { arrangement, inventory: [], assistCrane: assist });

describe('power lines: the main crane', () => {
  it('the default allowances are 3 m for the hook, load and tag lines and 2 m for sway (common practice, no source) and move the reach', () => {
    const r = run(plan({ assist: false }));
    // 1.4 (foot, demo data) + 36 + 3 + 2 = 42.4 m
    expect(r.powerLines[0].reachM).toBeCloseTo(42.4, 9);
    const tighter = run(plan({ assist: false, allowances: { loadAndTagLineAllowanceM: 6, swayAllowanceM: 4 } }));
    expect(tighter.powerLines[0].reachM).toBeCloseTo(47.4, 9);
    expect(fig(r, 'site.reach').detail).toMatch(/boom foot ahead of the slewing centre \(crane data\) 1\.4 m \+ boom 36 m \+ hook, load and tag lines \(setting\) 3 m \+ sway \(setting\) 2 m/);
  });

  it('the figure gives the distance with its basis and why, and the caution that local rules may differ', () => {
    const f = fig(run(plan({ assist: false })), 'powerLine.0');
    expect(f.value).toBe('17.6 m available, 6.10 m required (20 ft default, up to 350 kV; 11 kV)');
    expect(f.detail).toMatch(/Table A \(10 ft for this voltage\) needs the owner’s confirmation of the voltage and encroachment-prevention measures in place/);
    expect(f.detail).toMatch(/Local rules may differ.*HSE GS6/);
    expect(f.overridable).toBe(false);
  });

  it('the room left is rounded down and the distance required rounded up: 6.06 m left reads 6.0 m against 6.10 m (20 ft = 6.096 m), never 6.1 against 6.10', () => {
    // 48.46 − 42.4 = 6.06 m
    const f = fig(run(plan({ assist: false, line: { distanceM: 48.46 } })), 'powerLine.0');
    expect(f).toMatchObject({ status: 'fail', value: '6.0 m available, 6.10 m required (20 ft default, up to 350 kV; 11 kV)' });
  });

  it('the crane data without the boom foot or the auxiliary sheave: a stated allowance, shown as not included, never zero', () => {
    const bare = { ...crane, machine: { ...crane.machine, boomFoot: null }, auxSheave: null };
    const r = run(plan({ assist: false, aux: true }), bare);
    // 3 (foot allowance) + 36 + 3 (auxiliary-sheave allowance) + 3 + 2 = 47 m; fall zone 3 + 36 + 3 + 5 = 47 m
    expect(r.powerLines[0].reachM).toBeCloseTo(47, 9);
    expect(r.fallZoneRadiusM).toBeCloseTo(47, 9);
    expect(fig(r, 'site.notIncluded.boomFoot')).toMatchObject({ status: 'info', value: 'Not in the crane data: 3 m allowance taken' });
    expect(fig(r, 'site.notIncluded.auxSheave')).toMatchObject({ status: 'info', value: 'Not in the crane data: 3 m allowance taken' });
    // With the data: 1.4 + 36 + 1.5 + 3 + 2 = 43.9 m, and no "not included" figure.
    const full = run(plan({ assist: false, aux: true }));
    expect(full.powerLines[0].reachM).toBeCloseTo(43.9, 9);
    expect(full.figures.some((f) => f.key.startsWith('site.notIncluded'))).toBe(false);
  });

  it('a boom foot behind the slewing centre takes nothing off the reach (safe side)', () => {
    const behind = { ...crane, machine: { ...crane.machine, boomFoot: { aheadOfSlewCentreM: -1, heightM: 2 } } };
    expect(run(plan({ assist: false }), behind).powerLines[0].reachM).toBeCloseTo(41, 9);
  });
});

describe('power lines: the assist crane', () => {
  it('its own distance and reach: 20.5 m boom + 2 m foot and head allowance + 3 + 2 = 27.5 m; 33 m away → 5.5 m < 6.096 m fails, not overridable', () => {
    const r = run(plan({ line: { assistDistanceM: 33 } }));
    expect(r.powerLines[0].pass).toBe(true);
    expect(r.powerLines[0].assist?.reachM).toBeCloseTo(27.5, 9);
    expect(r.powerLines[0].assist?.availableClearanceM).toBeCloseTo(5.5, 9);
    expect(fig(r, 'powerLine.0.assist')).toMatchObject({ status: 'fail', overridable: false });
    expect(fig(r, 'powerLine.0.assist').detail).toMatch(/farther from the line/);
    expect(fig(run(plan({ line: { assistDistanceM: 34 } })), 'powerLine.0.assist').status).toBe('pass');
  });

  it('no distance entered → unverified, which never lets the plan through', () => {
    const f = fig(run(plan()), 'powerLine.0.assist');
    expect(f).toMatchObject({ status: 'unverified', overridable: false, value: 'Cannot check: distance not entered' });
  });

  it('assist crane data not loaded → unverified', () => {
    expect(fig(run(plan({ line: { assistDistanceM: 50 } }), crane, null as never), 'powerLine.0.assist').status).toBe('unverified');
  });

  it('no assist crane planned → no assist figure', () => {
    const r = run(plan({ assist: false }));
    expect(r.figures.some((f) => f.key === 'powerLine.0.assist')).toBe(false);
    expect(r.powerLines[0].assist).toBeNull();
  });
});

describe('wind limits say what they usually mean', () => {
  it('beside the limit: usually the 3-second gust at the boom’s highest point (from memory); a ground reading under-reads the tip', () => {
    const r = run(plan({ assist: false }));
    for (const key of ['wind.assembly', 'wind.raising']) {
      const f = fig(r, key);
      expect(f.value).toMatch(/usually the 3-second gust at the boom’s highest point/);
      expect(f.detail).toMatch(/from memory/);
      expect(f.detail).toMatch(/ground level under-reads the wind at the tip/);
    }
  });
});
