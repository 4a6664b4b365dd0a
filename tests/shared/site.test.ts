import { describe, expect, it } from 'vitest';
import { unit } from 'mathjs';
import { fallZoneRadiusM, powerLineClearanceM } from '../../shared/calc';
import { expectCalcError } from './helpers';

describe('powerLineClearanceM: 29 CFR 1926.1408 Table A', () => {
  // Table A rows (nominal kV, AC → feet); "over 50 to 200 means up to and including 200 kV".
  const tableA: Array<[number, number]> = [
    [50, 10],
    [200, 15],
    [350, 20],
    [500, 25],
    [750, 35],
    [1000, 45],
  ];
  for (const [kv, ft] of tableA) {
    it(`up to and including ${kv} kV → ${ft} ft (mathjs ft → m)`, () => {
      const r = powerLineClearanceM(kv);
      expect(r.clearanceFt).toBe(ft);
      expect(r.clearanceM).toBeCloseTo(unit(ft, 'ft').toNumber('m'), 12);
      expect(r.rule).toMatch(/1926\.1408 Table A/);
    });
  }

  it('just over a band edge moves to the next row: 50.1 kV → 15 ft, 11 kV → 10 ft (3.05 m)', () => {
    expect(powerLineClearanceM(50.1).clearanceFt).toBe(15);
    expect(powerLineClearanceM(11).clearanceM).toBeCloseTo(3.05, 2);
  });

  it('over 1,000 kV the table defers to the utility or a registered professional engineer', () => {
    const r = powerLineClearanceM(1100);
    expect(r.clearanceM).toBeNull();
    if (r.clearanceM === null && 'reason' in r) expect(r.reason).toMatch(/utility owner\/operator/);
  });

  it('refuses zero and negative voltages', () => {
    expectCalcError(() => powerLineClearanceM(0), 'kv');
    expectCalcError(() => powerLineClearanceM(-11), 'kv');
  });
});

describe('fallZoneRadiusM (common practice, no source; margin is a site setting)', () => {
  it('boom length + tip extension + margin', () => {
    const r = fallZoneRadiusM({ boomLengthM: 90, tipExtensionM: 1.5, marginM: 5 });
    expect(r.radiusM).toBe(96.5);
    expect(r.rule).toMatch(/common practice, no source/);
  });
  it('refuses a zero boom length and a negative margin', () => {
    expectCalcError(() => fallZoneRadiusM({ boomLengthM: 0, tipExtensionM: 0, marginM: 5 }), 'boomLengthM');
    expectCalcError(() => fallZoneRadiusM({ boomLengthM: 30, tipExtensionM: 0, marginM: -1 }), 'marginM');
  });
});
