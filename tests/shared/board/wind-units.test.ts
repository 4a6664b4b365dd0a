// The wind rule's words in a person's units (shared/board/rules.ts with shared/units/quantity.ts).
// US figures by hand from NIST SP 811 (2008) Appendix B.8, 1 mi/h = 4.4704 E-01 m/s exactly (from memory).
import { describe, expect, it } from 'vitest';
import { gustOverLimit, weatherOverLimit } from '../../../shared/board/rules';
import { quantitiesIn } from '../../../shared/units/quantity';

const us = quantitiesIn('us');
const limit = { meanMs: 9.8, gustMs: 12 };

describe('wind over the limit, worded in the person’s units', () => {
  it('metric reads as it always did', () => {
    expect(gustOverLimit(12.1, limit)).toBe('Gust 12.1 m/s is over the limit of 12 m/s');
    expect(weatherOverLimit({ meanMs: 10, gustMs: 11 }, limit)).toBe('Mean wind 10 m/s is over the limit of 9.8 m/s');
  });

  it('US customary: the reading rounded up, the limit rounded down, so the gap is never hidden', () => {
    // 12.1 / 0.44704 = 27.067… mph → 27.1 up; 12 / 0.44704 = 26.843… mph → 26.8 down.
    expect(gustOverLimit(12.1, limit, 'raising', us)).toBe('Gust 27.1 mph is over the raising limit of 26.8 mph');
    // 10 / 0.44704 = 22.369… → 22.4 up; 9.8 / 0.44704 = 21.922… → 21.9 down.
    expect(weatherOverLimit({ meanMs: 10, gustMs: 11 }, limit, us)).toBe('Mean wind 22.4 mph is over the limit of 21.9 mph');
    expect(weatherOverLimit({ meanMs: 5, gustMs: 12 }, limit, us)).toBeNull();
  });
});
