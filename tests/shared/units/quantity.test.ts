// The one display conversion (shared/units/quantity.ts): factors against NIST SP 811 and mathjs,
// the unit words, and the direction of rounding checked in exact rational arithmetic.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { unit } from 'mathjs';
import { fromShown, quantitiesIn, quantityKinds, showNumber, showQuantity, toShown, unitWord, type QuantityKind, type Rounding, type UnitSystem } from '../../../shared/units/quantity';

const FC = { numRuns: 300, seed: 20261204 };

// NIST Special Publication 811 (2008 edition), Guide for the Use of the International System of
// Units, Appendix B.8 "Factors for units listed alphabetically" and B.9 "Factors for units listed
// by kind of quantity" (Force; Length; Mass; Pressure; Velocity). FROM MEMORY: the text could not
// be read here. A factor printed in bold there (exact) is compared exactly through its SI value;
// the others to the seven digits the table prints.
describe('factors against NIST SP 811 (2008), Appendix B.8/B.9 (from memory)', () => {
  it('ton (short, 2 000 lb) = 9.071 847 E+02 kg (B.8 "ton, short"; B.9 Mass)', () => {
    // 1 US ton in SI is 907.18474 kg; one kilogram shows 1/907.18474 US tons.
    expect(fromShown('mass', 1, 'us')).toBeCloseTo(9.071847e2, 4);
  });
  it('pound-force (lbf) = 4.448 222 E+00 N (B.8 "pound-force"; B.9 Force)', () => {
    expect(fromShown('force', 1, 'us') * 1000).toBeCloseTo(4.448222, 6);
  });
  it('pound-force per square inch (psi) = 6.894 757 E+03 Pa (B.8 "psi"; B.9 Pressure)', () => {
    expect(fromShown('pressure', 1, 'us') * 1000).toBeCloseTo(6.894757e3, 3);
  });
  it('foot (ft) = 3.048 E-01 m, exact (B.8 "foot"; B.9 Length)', () => {
    expect(fromShown('length', 1, 'us')).toBe(0.3048);
  });
  it('mile per hour (mi/h) = 4.4704 E-01 m/s, exact (B.8 "mile per hour"; B.9 Velocity)', () => {
    expect(fromShown('windSpeed', 1, 'us')).toBe(0.44704);
  });
});

// mathjs (npm registry, v15), an independent units library: its ton is the short ton of 2,000 lb.
const mathjsUnit: Record<QuantityKind, [string, string]> = {
  mass: ['kg', 'ton'],
  force: ['kN', 'lbf'],
  length: ['m', 'ft'],
  pressure: ['kPa', 'psi'],
  windSpeed: ['m/s', 'mi/h'],
};

describe('conversions cross-checked with mathjs', () => {
  for (const kind of quantityKinds) {
    it(`${kind}: SI → US agrees with mathjs ${mathjsUnit[kind].join(' → ')} on 300 values`, () => {
      const [si, us] = mathjsUnit[kind];
      // mathjs derives psi from rounded constants (6894.75729276 Pa); the others agree to the last bits.
      const tolerance = kind === 'pressure' ? 1e-9 : 1e-12;
      fc.assert(
        fc.property(fc.double({ min: 1e-3, max: 1e6, noNaN: true }), (x) => {
          const ours = toShown(kind, x, 'us');
          const theirs = unit(x, si).toNumber(us);
          return Math.abs(ours - theirs) / theirs < tolerance;
        }),
        FC,
      );
    });
  }
});

describe('the figure as shown', () => {
  it('writes the unit out, from the one table, for each kind and system', () => {
    // 10 t, 100 kN, 30 m, 200 kPa, 10 m/s (hand examples; the US figures from the factors above).
    expect(showQuantity('mass', 10_000, 'metric', 'up')).toBe('10.00 t');
    expect(showQuantity('mass', 10_000, 'us', 'up')).toBe('11.03 US tons'); // 10 000 / 907.18474 = 11.023…
    expect(showQuantity('force', 100, 'metric', 'up')).toBe('100.0 kN');
    expect(showQuantity('force', 100, 'us', 'up')).toBe('22,481 lbf'); // 100 000 / 4.448 222 = 22 480.9…
    expect(showQuantity('length', 30, 'us', 'down')).toBe('98.4 ft'); // 30 / 0.3048 = 98.425…
    expect(showQuantity('pressure', 200, 'us', 'up')).toBe('29.1 psi'); // 200 000 / 6 894.757 = 29.007…
    expect(showQuantity('windSpeed', 10, 'us', 'nearest')).toBe('22.4 mph'); // 10 / 0.44704 = 22.369…
    for (const kind of quantityKinds) {
      for (const system of ['metric', 'us'] as const) expect(showQuantity(kind, 1, system, 'nearest').endsWith(` ${unitWord(kind, system)}`)).toBe(true);
    }
  });

  it('a capacity of 10.0004 US tons shows 10.00, a load of 10.0004 shows 10.01 (boundary of the second decimal)', () => {
    const kg = fromShown('mass', 10.0004, 'us');
    expect(showQuantity('mass', kg, 'us', 'down')).toBe('10.00 US tons');
    expect(showQuantity('mass', kg, 'us', 'up')).toBe('10.01 US tons');
    expect(showQuantity('mass', kg, 'us', 'nearest')).toBe('10.00 US tons');
    // With one decimal, as the brief puts it: 10.0 against 10.1.
    expect(showQuantity('mass', kg, 'us', 'down', 1)).toBe('10.0 US tons');
    expect(showQuantity('mass', kg, 'us', 'up', 1)).toBe('10.1 US tons');
  });

  it('just under a grid value: a load of 9.9996 US tons shows 10.00, a capacity 9.99', () => {
    const kg = fromShown('mass', 9.9996, 'us');
    expect(showQuantity('mass', kg, 'us', 'up')).toBe('10.00 US tons');
    expect(showQuantity('mass', kg, 'us', 'down')).toBe('9.99 US tons');
  });

  it('a limit typed in US units reads back as typed (binary noise is not a tenth)', () => {
    for (const [kind, typed, text] of [
      ['mass', 10, '10.00 US tons'],
      ['pressure', 30, '30.0 psi'],
      ['windSpeed', 22, '22.0 mph'],
      ['length', 10, '10.0 ft'],
      ['force', 5000, '5,000 lbf'],
    ] as const) {
      const si = fromShown(kind, typed, 'us');
      expect(showQuantity(kind, si, 'us', 'up')).toBe(text);
      expect(showQuantity(kind, si, 'us', 'down')).toBe(text);
    }
  });

  it('groups thousands of pounds-force and keeps the direction: 22,480.9 lbf is 22,481 up and 22,480 down', () => {
    expect(showNumber('force', 100, 'us', 'up')).toBe('22,481');
    expect(showNumber('force', 100, 'us', 'down')).toBe('22,480');
    expect(showNumber('force', 10_000, 'us', 'down')).toBe('2,248,089');
    expect(showNumber('force', 0.1, 'us', 'up')).toBe('23');
  });

  it('trims trailing zeros only when asked, after the rounding: a reading shows as recorded', () => {
    expect(showQuantity('length', 12, 'metric', 'nearest', 1, true)).toBe('12 m');
    expect(showQuantity('windSpeed', 6.3, 'metric', 'up', 1, true)).toBe('6.3 m/s');
    expect(showQuantity('windSpeed', 6.3, 'metric', 'up', 1)).toBe('6.3 m/s');
    expect(showQuantity('length', 12, 'metric', 'nearest')).toBe('12.0 m');
    expect(showQuantity('windSpeed', 0.44704 * 20, 'us', 'up', 1, true)).toBe('20 mph');
    expect(showQuantity('force', 100, 'us', 'up', 0, true)).toBe('22,481 lbf');
  });

  it('quantitiesIn carries the system through', () => {
    expect(quantitiesIn('us').pressure(200, 'up')).toBe('29.1 psi');
    expect(quantitiesIn('metric').wind(9.8, 'down')).toBe('9.8 m/s');
  });
});

// ---- the direction of rounding, in exact rational arithmetic ----

/** A double as an exact fraction [numerator, denominator]. */
function exactOf(x: number): [bigint, bigint] {
  const buf = new DataView(new ArrayBuffer(8));
  buf.setFloat64(0, x);
  const bits = buf.getBigUint64(0);
  const exponent = Number((bits >> 52n) & 0x7ffn);
  const fraction = bits & ((1n << 52n) - 1n);
  const mantissa = exponent === 0 ? fraction : fraction | (1n << 52n);
  const power = (exponent === 0 ? 1 : exponent) - 1075;
  return power >= 0 ? [mantissa << BigInt(power), 1n] : [mantissa, 1n << BigInt(-power)];
}

/** A decimal string ("22,481", "10.01") as an exact fraction. */
function decimalOf(text: string): [bigint, bigint] {
  const plainText = text.replace(/,/g, '');
  const [whole, frac = ''] = plainText.split('.');
  return [BigInt(whole + frac), 10n ** BigInt(frac.length)];
}

// The exact factors, written from the definitions (1959 yard and pound, standard gravity), not
// from the code: shown = SI × num / den.
const exactFactor: Record<QuantityKind, [bigint, bigint]> = {
  mass: [100_000_000n, 90_718_474_000n], // 1 / (2000 × 0.45359237 kg)
  force: [10_000_000_000_000_000n, 44_482_216_152_605n], // 1000 N / (0.45359237 × 9.80665 N)
  length: [10_000n, 3_048n], // 1 / 0.3048
  pressure: [6_451_600_000_000n, 44_482_216_152_605n], // 1000 Pa × (0.0254 m)² / 1 lbf
  windSpeed: [100_000n, 44_704n], // 1 / 0.44704
};

/**
 * Whether `shown` is on the safe side of the exact conversion of `si`. The rounding clears binary
 * noise at 12 significant digits (shared/format.ts), so that a figure typed as 10 US tons reads
 * back 10.00 and not 10.01; a figure is therefore allowed that far (1e-11 relative) past the exact
 * value, and no further. It must also be within one step of the last decimal of it.
 */
function safeSide(kind: QuantityKind, si: number, shown: string, rounding: Rounding, decimals: number): boolean {
  const [sn, sd] = exactOf(si);
  const [fn, fd] = exactFactor[kind];
  const [vn, vd] = decimalOf(shown);
  // exact = sn·fn / (sd·fd); compare vn/vd with it on a common denominator.
  const exactNum = sn * fn * vd;
  const shownNum = vn * sd * fd;
  const slack = exactNum / 100_000_000_000n; // 1e-11 of the exact value
  const step = (sd * fd * vd) / 10n ** BigInt(decimals); // one unit of the last decimal
  if (rounding === 'up' && shownNum < exactNum - slack) return false;
  if (rounding === 'down' && shownNum > exactNum + slack) return false;
  const gap = shownNum > exactNum ? shownNum - exactNum : exactNum - shownNum;
  return gap <= step + slack;
}

const decimalsOf: Record<QuantityKind, number> = { mass: 2, force: 0, length: 1, pressure: 1, windSpeed: 1 };
const kindArb = fc.constantFrom<QuantityKind>(...quantityKinds);
const systemArb = fc.constantFrom<UnitSystem>('metric', 'us');

describe('rounding direction (fast-check, exact arithmetic)', () => {
  it('a capacity rounded down never exceeds its exact conversion; a load rounded up never falls below it', () => {
    fc.assert(
      // From a millionth up: a subnormal double (5e-324 kg) vanishes in any division, and no figure is that small.
      fc.property(kindArb, fc.oneof(fc.constant(0), fc.double({ min: 1e-6, max: 1e7, noNaN: true })), (kind, si) => {
        const down = showNumber(kind, si, 'us', 'down');
        const up = showNumber(kind, si, 'us', 'up');
        return safeSide(kind, si, down, 'down', decimalsOf[kind]) && safeSide(kind, si, up, 'up', decimalsOf[kind]);
      }),
      FC,
    );
  });

  it('the same just either side of every shown step (a billionth above and below a grid value)', () => {
    fc.assert(
      fc.property(kindArb, systemArb, fc.integer({ min: 1, max: 5_000_000 }), fc.constantFrom(-1e-9, -1e-10, 1e-10, 1e-9), (kind, system, k, nudge) => {
        const d = system === 'metric' ? (kind === 'mass' ? 2 : 1) : decimalsOf[kind];
        const grid = k / 10 ** d;
        const si = fromShown(kind, grid, system) * (1 + nudge);
        const down = showNumber(kind, si, system, 'down');
        const up = showNumber(kind, si, system, 'up');
        if (system === 'us') {
          if (!safeSide(kind, si, down, 'down', d) || !safeSide(kind, si, up, 'up', d)) return false;
        }
        // Either system: below the grid value a capacity steps down and a load shows the grid value; above it the reverse.
        const gridText = showNumber(kind, fromShown(kind, grid, system), system, 'nearest');
        return nudge < 0 ? up === gridText && down !== gridText : down === gridText && up !== gridText;
      }),
      FC,
    );
  });
});
