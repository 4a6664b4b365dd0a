// Every conversion is checked against mathjs (npm registry, v15), an independent units library,
// on fixed values and on 200 generated values each.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { evaluate, unit } from 'mathjs';
import {
  CalcInputError,
  ftToM,
  kmhToMs,
  knToLbf,
  knToTonnesForce,
  knotsToMs,
  kpaToTonnesPerM2,
  lbfToKn,
  mToFt,
  mphToMs,
  msToKmh,
  msToMph,
  tonnesForceToKn,
  tonnesPerM2ToKpa,
} from '../../../shared/calc';
import { expectCalcError, relErr } from '../helpers';

const FC = { numRuns: 200, seed: 20261201 };
const magnitude = fc.double({ min: 1e-6, max: 1e7, noNaN: true });

// Each row: our conversion, and what mathjs says for the same value.
const cases: Array<[string, (x: number) => number, (x: number) => number]> = [
  ['tonnes-force → kN (mathjs tonne × gravity)', tonnesForceToKn, (x) => evaluate(`${x} tonne * gravity`).toNumber('kN')],
  ['kN → tonnes-force', knToTonnesForce, (x) => unit(x, 'kN').toNumber('N') / evaluate('1 kg * gravity').toNumber('N') / 1000],
  ['lbf → kN (mathjs lbf)', lbfToKn, (x) => unit(x, 'lbf').toNumber('kN')],
  ['kN → lbf', knToLbf, (x) => unit(x, 'kN').toNumber('lbf')],
  ['ft → m (mathjs ft)', ftToM, (x) => unit(x, 'ft').toNumber('m')],
  ['m → ft', mToFt, (x) => unit(x, 'm').toNumber('ft')],
  ['mph → m/s (mathjs mi/h)', mphToMs, (x) => unit(x, 'mi/h').toNumber('m/s')],
  ['m/s → mph', msToMph, (x) => unit(x, 'm/s').toNumber('mi/h')],
  ['km/h → m/s (mathjs km/h)', kmhToMs, (x) => unit(x, 'km/h').toNumber('m/s')],
  ['m/s → km/h', msToKmh, (x) => unit(x, 'm/s').toNumber('km/h')],
  // mathjs has no knot unit: 1 knot = 1852 m per hour (international nautical mile).
  ['knots → m/s (mathjs 1852 m / hour)', knotsToMs, (x) => evaluate(`${x} * 1852 m / hour`).toNumber('m/s')],
  ['kPa → t/m² (mathjs tonne × gravity / m²)', kpaToTonnesPerM2, (x) => x / evaluate('1 tonne * gravity / m^2').toNumber('kPa')],
  ['t/m² → kPa', tonnesPerM2ToKpa, (x) => evaluate(`${x} tonne * gravity / m^2`).toNumber('kPa')],
];

describe('unit conversions against mathjs', () => {
  for (const [name, ours, reference] of cases) {
    it(`${name}: fixed values`, () => {
      for (const x of [0.5, 1, 9.80665, 250, 12345.678]) {
        expect(relErr(ours(x), reference(x))).toBeLessThan(1e-12);
      }
      expect(ours(0)).toBe(0);
    });
    it(`${name}: 200 generated values`, () => {
      fc.assert(
        fc.property(magnitude, (x) => relErr(ours(x), reference(x)) < 1e-12),
        FC,
      );
    });
  }

  it('1 tonne-force is 9.80665 kN exactly (standard gravity, 3rd CGPM 1901)', () => {
    expect(tonnesForceToKn(1)).toBe(9.80665);
    expect(evaluate('1 tonne * gravity').toNumber('kN')).toBeCloseTo(9.80665, 12);
  });

  it('10 ft is 3.048 m (the 3.05 m of 29 CFR 1926.1408 Table A, rounded)', () => {
    expect(ftToM(10)).toBeCloseTo(3.048, 12);
  });

  // NIST Special Publication 811 (2008 edition), Guide for the Use of the International System of
  // Units, Appendix B.8 "Factors for units listed alphabetically" (from memory, not re-read here);
  // the factors marked exact there are compared exactly, the others to the digits the table prints.
  it('NIST SP 811 (2008) Appendix B.8: foot 3.048 E-01 m, mile per hour 4.4704 E-01 m/s, kilogram-force 9.806 65 E+00 N (exact)', () => {
    expect(ftToM(1)).toBe(0.3048);
    expect(mphToMs(1)).toBe(0.44704);
    expect(tonnesForceToKn(1)).toBe(9.80665); // 1 kgf = 9.806 65 N, so 1 tf = 9.806 65 kN
  });
  it('NIST SP 811 (2008) Appendix B.8: pound-force 4.448 222 E+00 N, knot 5.144 444 E-01 m/s, kilometer per hour 2.777 778 E-01 m/s', () => {
    expect(lbfToKn(1) * 1000).toBeCloseTo(4.448222, 6);
    expect(knotsToMs(1)).toBeCloseTo(0.5144444, 7);
    expect(kmhToMs(1)).toBeCloseTo(0.2777778, 7);
  });

  it('refuses negative and non-finite magnitudes with the field named', () => {
    for (const bad of [-1, Number.NaN, Number.POSITIVE_INFINITY]) {
      expect(() => tonnesForceToKn(bad)).toThrow(CalcInputError);
      expectCalcError(() => mphToMs(bad), 'mph');
    }
  });
});
