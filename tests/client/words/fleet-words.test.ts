// The fleet screens' weights. The expected strings are worked by hand from the kilograms in the
// data; the direction (a weight reads up, never under) is common practice, no source.
import { describe, expect, it } from 'vitest';
import { metres, tonnes } from '../../../src/words/fleet';

describe('fleet words: weights and lengths', () => {
  it('writes a weight in tonnes rounded up to 0.01 t, as the boom drawing and the configuration sheet do', () => {
    // 13,838 kg = 13.838 t, shown rounded up (to the nearest 0.1 t it read 13.8 t, under the weight).
    expect(tonnes(13838)).toBe('13.84 t');
    expect(tonnes(95000)).toBe('95.00 t');
    expect(tonnes(2701)).toBe('2.71 t');
  });
  it('writes a length to the nearest centimetre without trailing zeros', () => {
    expect(metres(12)).toBe('12 m');
    expect(metres(20.505)).toBe('20.51 m');
  });
});
