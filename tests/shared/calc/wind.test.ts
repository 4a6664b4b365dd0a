import { describe, expect, it } from 'vitest';
import { evaluate, unit } from 'mathjs';
import { BEAUFORT_SCALE, beaufortForce, windCheck, windPressureNpm2 } from '../../../shared/calc';
import { demoCrane, expectCalcError, relErr } from '../helpers';

describe('beaufortForce: the Beaufort scale as meteorological services publish it', () => {
  // Mean-speed bands in m/s at 10 m as the WMO and the UK Met Office publish them (0–0.2, 0.3–1.5,
  // 1.6–3.3, … 32.7 and above); from memory of the Met Office's Beaufort scale page, not re-read here.
  const bandsMs: Array<[number, number, number]> = [
    [0, 0, 0.2],
    [1, 0.3, 1.5],
    [2, 1.6, 3.3],
    [3, 3.4, 5.4],
    [4, 5.5, 7.9],
    [5, 8.0, 10.7],
    [6, 10.8, 13.8],
    [7, 13.9, 17.1],
    [8, 17.2, 20.7],
    [9, 20.8, 24.4],
    [10, 24.5, 28.4],
    [11, 28.5, 32.6],
  ];
  for (const [force, lo, hi] of bandsMs) {
    it(`force ${force}: ${lo}–${hi} m/s`, () => {
      expect(beaufortForce(lo).force).toBe(force);
      expect(beaufortForce(hi).force).toBe(force);
    });
  }
  it('force 12: 32.7 m/s and above', () => {
    expect(beaufortForce(32.7).force).toBe(12);
    expect(beaufortForce(60).force).toBe(12);
  });

  // UK Met Office marine table, knots: <1, 1–3, 4–6, 7–10, 11–16, 17–21, 22–27, 28–33, 34–40,
  // 41–47, 48–55, 56–63, 64+; converted with mathjs (1 knot = 1852 m/h) at each band's middle.
  const metOfficeKnots: Array<[number, number]> = [
    [0, 0.5],
    [1, 2],
    [2, 5],
    [3, 8.5],
    [4, 13.5],
    [5, 19],
    [6, 24.5],
    [7, 30.5],
    [8, 37],
    [9, 44],
    [10, 51.5],
    [11, 59.5],
    [12, 70],
  ];
  for (const [force, knots] of metOfficeKnots) {
    it(`Met Office knots band for force ${force} (${knots} kn, mathjs) agrees`, () => {
      const ms = evaluate(`${knots} * 1852 m / hour`).toNumber('m/s');
      expect(beaufortForce(ms).force).toBe(force);
    });
  }

  it('descriptions as the Met Office lists them (from memory): 9 m/s is a fresh breeze, 15 m/s a near gale', () => {
    expect(beaufortForce(9).description).toBe('Fresh breeze');
    expect(beaufortForce(15).description).toBe('Near gale');
    expect(BEAUFORT_SCALE).toHaveLength(13);
  });

  it('refuses a negative speed', () => {
    expectCalcError(() => beaufortForce(-0.1), 'speedMs');
  });
});

describe('windPressureNpm2: q = 0.613·v² (ISO 4302)', () => {
  it('names ISO 4302 as its rule', () => {
    expect(windPressureNpm2(20).rule).toMatch(/ISO 4302/);
  });

  it('agrees with ½ρv² for the ISO 2533 standard atmosphere at sea level (ρ = 1.225 kg/m³, from memory) within 0.1 %, and is never below it', () => {
    for (const v of [5, 13.5, 20, 35]) {
      const halfRhoV2 = evaluate(`0.5 * 1.225 kg/m^3 * (${v} m/s)^2`).toNumber('N/m^2');
      const ours = windPressureNpm2(v).pressureNpm2;
      expect(relErr(ours, halfRhoV2)).toBeLessThan(1e-3);
      expect(ours).toBeGreaterThanOrEqual(halfRhoV2);
    }
  });

  it('agrees with ASCE 7-16 eq. 26.10-1, q = 0.00256·V² psf with V in mph and every factor taken as 1 (from memory), within 0.2 %', () => {
    // 20 m/s in mph and psf through mathjs: 0.00256 × 44.74² = 5.124 psf ≈ 245.3 N/m².
    const v = 20;
    const mph = unit(v, 'm/s').toNumber('mi/h');
    const asce = unit(0.00256 * mph * mph, 'lbf/ft^2').toNumber('N/m^2');
    expect(relErr(windPressureNpm2(v).pressureNpm2, asce)).toBeLessThan(2e-3);
  });
});

describe('windCheck: limits from the crane model data only', () => {
  const crane = demoCrane();
  const ninety = crane.arrangements.find((a) => a.boomLengthM === 90);
  if (!ninety) throw new Error('demo data lost its 90 m arrangement');
  const limits = ninety.wind.raising; // invented: gust 9.0, mean 6.5 m/s

  // A limit is a maximum: at the limit counts as within it (common practice, no source).
  it('at the limit is within it; above either limit fails with the reason', () => {
    expect(windCheck({ gustMs: limits.gustMs, meanMs: limits.meanMs, limits }).pass).toBe(true);
    const gusty = windCheck({ gustMs: limits.gustMs + 0.1, meanMs: 5, limits });
    expect(gusty.pass).toBe(false);
    expect(gusty.gustWithinLimit).toBe(false);
    expect(gusty.meanWithinLimit).toBe(true);
    expect(gusty.reasons[0]).toMatch(/gust 9.1 m\/s is above the limit of 9 m\/s/);
    expect(windCheck({ gustMs: 8.5, meanMs: limits.meanMs + 0.5, limits }).meanWithinLimit).toBe(false);
  });

  it('refuses a gust lower than the mean', () => {
    expectCalcError(() => windCheck({ gustMs: 4, meanMs: 5, limits }), 'gustMs');
  });
});
