import { describe, expect, it } from 'vitest';
import { unit } from 'mathjs';
import { SHEAVE_EFFICIENCY_PRESETS, leadLinePull, requiredParts } from '../../shared/calc';
import { expectCalcError, relErr } from './helpers';

const lbfToKn = (lbf: number) => unit(lbf, 'lbf').toNumber('kN');

describe('leadLinePull', () => {
  it('Pipeline Rules of Thumb Handbook, block-and-tackle example: 4 parts, E = 91.7 % → MA 3.25, 3,250 lb needs about 1,000 lb', () => {
    const r = leadLinePull({ loadKn: lbfToKn(3250), parts: 4, sheaveEfficiency: 0.917, extraLeadSheaves: 0 });
    // The handbook rounds MA to 3.25; the closed form gives 3.236.
    expect(r.mechanicalAdvantage).toBeCloseTo(3.25, 1);
    expect(relErr(r.leadLinePullKn, lbfToKn(1000))).toBeLessThan(0.005);
    expect(r.rule).toMatch(/E\(1−Eⁿ\)\/\(1−E\)/);
  });

  it('Wire Rope Users Manual 4th ed.: plain bearings, 4 parts → lead-line factor 0.309', () => {
    const r = leadLinePull({ loadKn: 1, parts: 4, sheaveEfficiency: 1 / 1.09, extraLeadSheaves: 0 });
    expect(r.leadLinePullKn).toBeCloseTo(0.309, 3);
  });

  it('Wire Rope Users Manual 4th ed. example: 4 parts, plain bearings, two extra lead sheaves, 6,000 lb → 2,202 lb (0.309 × 1.09 × 1.09)', () => {
    const exact = leadLinePull({ loadKn: lbfToKn(6000), parts: 4, sheaveEfficiency: 1 / 1.09, extraLeadSheaves: 2 });
    expect(relErr(exact.leadLinePullKn, lbfToKn(2202))).toBeLessThan(0.001);
    // The rounded preset (91.7 %) lands within 0.2 % of the same published answer.
    const preset = leadLinePull({
      loadKn: lbfToKn(6000),
      parts: 4,
      sheaveEfficiency: SHEAVE_EFFICIENCY_PRESETS.plainBearing.efficiency,
      extraLeadSheaves: 2,
    });
    expect(relErr(preset.leadLinePullKn, lbfToKn(2202))).toBeLessThan(0.002);
  });

  it('Wire Rope Users Manual 4th ed., static case: 6,000 lb on 4 parts without friction → 1,500 lb (MA = n when E = 1)', () => {
    const r = leadLinePull({ loadKn: lbfToKn(6000), parts: 4, sheaveEfficiency: 1, extraLeadSheaves: 0 });
    expect(r.mechanicalAdvantage).toBe(4);
    expect(relErr(r.leadLinePullKn, lbfToKn(1500))).toBeLessThan(1e-12);
  });

  it('refuses zero parts, fractional parts, efficiency 0 or above 1, negative load', () => {
    const ok = { loadKn: 100, parts: 4, sheaveEfficiency: 0.96, extraLeadSheaves: 0 };
    expectCalcError(() => leadLinePull({ ...ok, parts: 0 }), 'parts');
    expectCalcError(() => leadLinePull({ ...ok, parts: 2.5 }), 'parts');
    expectCalcError(() => leadLinePull({ ...ok, sheaveEfficiency: 0 }), 'sheaveEfficiency');
    expectCalcError(() => leadLinePull({ ...ok, sheaveEfficiency: 1.01 }), 'sheaveEfficiency');
    expectCalcError(() => leadLinePull({ ...ok, loadKn: -1 }), 'loadKn');
    expectCalcError(() => leadLinePull({ ...ok, extraLeadSheaves: -1 }), 'extraLeadSheaves');
  });
});

describe('sheave efficiency presets', () => {
  it('plain bearing 91.7 % (Pipeline Rules of Thumb Handbook) = 1/1.09 to three places (Wire Rope Users Manual)', () => {
    expect(SHEAVE_EFFICIENCY_PRESETS.plainBearing.efficiency).toBe(0.917);
    expect(1 / 1.09).toBeCloseTo(SHEAVE_EFFICIENCY_PRESETS.plainBearing.efficiency, 3);
    expect(SHEAVE_EFFICIENCY_PRESETS.plainBearing.source).toMatch(/Pipeline Rules of Thumb/);
  });
  it('rolling bearing 96.2 % (Pipeline Rules of Thumb Handbook) = 1/1.04 to three places (Wire Rope Users Manual)', () => {
    expect(SHEAVE_EFFICIENCY_PRESETS.rollingBearing.efficiency).toBe(0.962);
    expect(1 / 1.04).toBeCloseTo(SHEAVE_EFFICIENCY_PRESETS.rollingBearing.efficiency, 3);
  });
});

describe('requiredParts', () => {
  it('frictionless: 6,000 lb within 1,600 lb needs 4 parts (6,000/3 = 2,000 is too much; WRUM static rule)', () => {
    const r = requiredParts({ loadKn: lbfToKn(6000), permissibleLinePullKn: lbfToKn(1600), sheaveEfficiency: 1, extraLeadSheaves: 0 });
    expect(r.achievable).toBe(true);
    expect(r.parts).toBe(4);
  });

  it('is the smallest n: n parts are within the permissible pull, n − 1 are not', () => {
    const input = { loadKn: 1200, permissibleLinePullKn: 135, sheaveEfficiency: 0.962, extraLeadSheaves: 1 };
    const r = requiredParts(input);
    if (!r.achievable) throw new Error('expected an achievable reeving');
    expect(leadLinePull({ ...input, parts: r.parts }).leadLinePullKn).toBeLessThanOrEqual(135);
    expect(leadLinePull({ ...input, parts: r.parts - 1 }).leadLinePullKn).toBeGreaterThan(135);
  });

  it('friction caps MA at E/(1−E) (limit of the handbook formula): 2,000 kN on 150 kN with E = 0.917 cannot be reeved', () => {
    // 0.917 / 0.083 = 11.05 < 2000 / 150 = 13.3
    const r = requiredParts({ loadKn: 2000, permissibleLinePullKn: 150, sheaveEfficiency: 0.917, extraLeadSheaves: 0 });
    expect(r.achievable).toBe(false);
    expect(r.parts).toBeNull();
    if (!r.achievable) expect(r.reason).toMatch(/above the permissible 150 kN/);
  });

  it('refuses a zero permissible pull', () => {
    expectCalcError(
      () => requiredParts({ loadKn: 10, permissibleLinePullKn: 0, sheaveEfficiency: 0.96, extraLeadSheaves: 0 }),
      'permissibleLinePullKn',
    );
  });
});
