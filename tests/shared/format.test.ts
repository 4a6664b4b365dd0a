// The one number formatter. The expected strings are worked by hand from the decimal as written;
// the properties compare with mathjs (npm registry, v15), whose BigNumber ceil/floor/round work in
// decimal arithmetic (decimal.js) on the number as typed: an implementation independent of ours.
// The direction (loads and pressures up, capacities and clearances down) is common practice, no source.
import fc from 'fast-check';
import { bignumber, ceil, floor, round } from 'mathjs';
import { describe, expect, it } from 'vitest';
import { asStated, fmt, fmtDown, fmtUp, grouped, plain, plainDown, plainUp, tonnesUp } from '../../shared/format';

describe('fmtUp: loads, pulls and pressures never read lower than computed', () => {
  it('rounds a half and anything above the grid up', () => {
    expect(fmtUp(2.05, 1)).toBe('2.1');
    expect(fmtUp(2.01, 1)).toBe('2.1');
    expect(fmtUp(12.3401, 2)).toBe('12.35');
    expect(fmtUp(7.0000001, 0)).toBe('8');
    expect(fmtUp(99.95)).toBe('100.0');
  });
  it('keeps a value on the grid as it is, also when binary stores it a hair above', () => {
    expect(fmtUp(2, 1)).toBe('2.0');
    expect(fmtUp(32.50000000000001, 1)).toBe('32.5');
    expect(fmtUp(0.1 + 0.2, 1)).toBe('0.3');
    expect(fmtUp(7, 0)).toBe('7');
  });
  it('goes toward plus infinity for a negative number, and never shows -0', () => {
    expect(fmtUp(-2.05, 1)).toBe('-2.0');
    expect(fmtUp(-2.11, 1)).toBe('-2.1');
    expect(fmtUp(-0.04, 1)).toBe('0.0');
    expect(fmtUp(-0, 2)).toBe('0.00');
  });
});

describe('fmtDown: capacities, clearances and what is left never read higher than computed', () => {
  it('rounds a half and anything below the next grid point down', () => {
    expect(fmtDown(2.05, 1)).toBe('2.0');
    expect(fmtDown(2.09, 1)).toBe('2.0');
    expect(fmtDown(12.3499, 2)).toBe('12.34');
    expect(fmtDown(7.9999, 0)).toBe('7');
  });
  it('keeps a value on the grid as it is, also when binary stores it a hair below', () => {
    expect(fmtDown(15.599999999999998, 1)).toBe('15.6');
    expect(fmtDown(0.7 + 0.1, 1)).toBe('0.8');
    expect(fmtDown(4.35, 2)).toBe('4.35');
    // 33118.2 × 1000 is 33118199.999999996 in binary, too far from the grid for a fixed tolerance.
    expect(fmtDown(33118.2, 3)).toBe('33118.200');
  });
  it('goes toward minus infinity for a negative number, and never shows -0', () => {
    expect(fmtDown(-2.05, 1)).toBe('-2.1');
    expect(fmtDown(-2.01, 1)).toBe('-2.1');
    expect(fmtDown(-0, 1)).toBe('0.0');
    expect(fmtDown(0.04, 1)).toBe('0.0');
  });
});

describe('fmt: fixed decimals for information', () => {
  it('rounds to the nearest with the decimals asked for', () => {
    expect(fmt(2.25, 1)).toBe('2.3');
    expect(fmt(2.24, 1)).toBe('2.2');
    expect(fmt(1.2345, 2)).toBe('1.23');
    expect(fmt(3)).toBe('3.0');
    expect(fmt(1234.5678, 0)).toBe('1235');
  });
  it('rounds the decimal as written, as plain does, not its binary neighbour', () => {
    // 1.15 × 10 is 11.499999999999998 and 1.005 × 100 is 100.49999999999999 in binary; toFixed gave "1.1" and "1.00".
    expect(fmt(1.15, 1)).toBe('1.2');
    expect(fmt(1.005, 2)).toBe('1.01');
    expect(fmt(2.675, 2)).toBe('2.68');
  });
  it('never shows -0', () => {
    expect(fmt(-0)).toBe('0.0');
    expect(fmt(-0.04)).toBe('0.0');
    expect(fmt(-0.001, 2)).toBe('0.00');
    expect(fmt(-0.26, 1)).toBe('-0.3');
  });
});

describe('plain and grouped: numbers from the data, no trailing zeros', () => {
  it('drops trailing zeros and keeps at most the decimals asked for', () => {
    expect(plain(40)).toBe('40');
    expect(plain(12.5)).toBe('12.5');
    expect(plain(2.0004)).toBe('2');
    expect(plain(2.0006)).toBe('2.001');
    expect(plain(18.456, 2)).toBe('18.46');
  });
  it('rounds the decimal as written, not its binary neighbour', () => {
    // 1.15 × 10 is 11.499999999999998 and 1.005 × 100 is 100.49999999999999 in binary.
    expect(plain(1.15, 1)).toBe('1.2');
    expect(plain(1.005, 2)).toBe('1.01');
  });
  it('rounds a negative half toward plus infinity and never shows -0', () => {
    expect(plain(-2.05, 1)).toBe('-2');
    expect(plain(-2.06, 1)).toBe('-2.1');
    expect(plain(-0.0001)).toBe('0');
    expect(plain(-0)).toBe('0');
  });
  it('groups thousands the British way', () => {
    expect(grouped(1234.56, 1)).toBe('1,234.6');
    expect(grouped(12000, 1)).toBe('12,000');
    expect(grouped(1150 / 1000, 1)).toBe('1.2');
    expect(grouped(999.96, 1)).toBe('1,000');
    expect(grouped(-0.01, 1)).toBe('0');
    expect(grouped(-1234.5, 0)).toBe('-1,234');
  });
});

describe('plainUp, plainDown and tonnesUp: a directed figure inside a sentence', () => {
  it('rounds up or down as fmtUp and fmtDown do, without trailing zeros', () => {
    expect(plainUp(6.0949, 2)).toBe('6.1');
    expect(plainUp(41.21, 1)).toBe('41.3');
    expect(plainUp(4.301, 2)).toBe('4.31');
    expect(plainUp(12.5)).toBe('12.5');
    expect(plainUp(32.50000000000001, 1)).toBe('32.5');
    expect(plainDown(17.69, 1)).toBe('17.6');
    expect(plainDown(15.599999999999998, 1)).toBe('15.6');
    expect(plainDown(6, 1)).toBe('6');
    expect(plainDown(-0.04, 1)).toBe('-0.1');
    expect(plainUp(-0.04, 1)).toBe('0');
  });
  it('writes a weight in tonnes rounded up to 0.01 t', () => {
    expect(tonnesUp(13838)).toBe('13.84');
    expect(tonnesUp(12500)).toBe('12.50');
    expect(tonnesUp(12001)).toBe('12.01');
    expect(tonnesUp(0)).toBe('0.00');
  });
});

describe('asStated: a reading as typed', () => {
  it('clears the binary noise of arithmetic on typed decimals and nothing else', () => {
    expect(asStated(6.4 - 6.5)).toBe('-0.1');
    expect(asStated(0.1 + 0.2)).toBe('0.3');
    expect(asStated(1234.5678)).toBe('1234.5678');
    expect(asStated(0.125)).toBe('0.125');
    expect(asStated(-0)).toBe('0');
  });
});

// A decimal typed with up to 4 places, between -99999.9999 and 99999.9999, as a person or the data writes it.
const typedDecimal = fc
  .tuple(fc.integer({ min: -99_999_9999, max: 99_999_9999 }), fc.integer({ min: 0, max: 4 }))
  .map(([units, places]) => {
    const text = (Math.abs(units) / 10_000).toFixed(4).replace(/\.?0+$/, '') || '0';
    const shortened = text.includes('.') ? text.slice(0, text.indexOf('.') + 1 + places).replace(/\.$/, '') : text;
    return units < 0 && Number(shortened) !== 0 ? `-${shortened}` : shortened;
  });

describe('against mathjs BigNumber on the decimal as typed', () => {
  it('fmtUp is the decimal ceiling and fmtDown the decimal floor, to 0, 1, 2 and 3 places', () => {
    fc.assert(
      fc.property(typedDecimal, fc.integer({ min: 0, max: 3 }), (typed, places) => {
        const up = ceil(bignumber(typed), places).toFixed(places);
        const down = floor(bignumber(typed), places).toFixed(places);
        // decimal.js writes a rounded negative zero as "-0.0"; ours never does.
        expect(fmtUp(Number(typed), places)).toBe(up.replace(/^-(0(\.0+)?)$/, '$1'));
        expect(fmtDown(Number(typed), places)).toBe(down.replace(/^-(0(\.0+)?)$/, '$1'));
      }),
      { numRuns: 2000 },
    );
  });
  it('fmt is the decimal rounding (half up) with fixed places, for numbers of zero and above', () => {
    fc.assert(
      fc.property(
        typedDecimal.filter((t) => !t.startsWith('-')),
        fc.integer({ min: 0, max: 3 }),
        (typed, places) => {
          expect(fmt(Number(typed), places)).toBe(round(bignumber(typed), places).toFixed(places));
        },
      ),
      { numRuns: 2000 },
    );
  });
  it('plainUp is the decimal ceiling and plainDown the decimal floor, without trailing zeros', () => {
    fc.assert(
      fc.property(typedDecimal, fc.integer({ min: 0, max: 3 }), (typed, places) => {
        // decimal.js writes a rounded negative zero as "-0"; ours never does.
        expect(plainUp(Number(typed), places)).toBe(ceil(bignumber(typed), places).toString().replace(/^-0$/, '0'));
        expect(plainDown(Number(typed), places)).toBe(floor(bignumber(typed), places).toString().replace(/^-0$/, '0'));
      }),
      { numRuns: 2000 },
    );
  });
  it('plain is the decimal rounding (half up) for numbers of zero and above', () => {
    fc.assert(
      fc.property(
        typedDecimal.filter((t) => !t.startsWith('-')),
        fc.integer({ min: 0, max: 3 }),
        (typed, places) => {
          expect(plain(Number(typed), places)).toBe(round(bignumber(typed), places).toString());
        },
      ),
      { numRuns: 2000 },
    );
  });
});
