// Times on screen are the site's clock with its UTC offset, whatever zone the device is in.
// Offsets: IANA time zone database. Europe/Warsaw UTC+01:00 in winter (Directive 2000/84/EC: summer
// time only from the last Sunday of March to the last Sunday of October); America/Chicago
// UTC−06:00 in winter (Central Standard Time, 15 U.S.C. 260a); Pacific/Auckland UTC+13:00 in
// December (New Zealand daylight time; from memory).
import { describe, expect, it } from 'vitest';
import { formatInstant, formatWhen, formatWhenParts, siteTimeWords, zoneWords } from '../../../src/services/time';

describe('formatWhen: the site’s clock with its offset', () => {
  const now = new Date('2026-11-02T14:00:00Z'); // 15:00 on 2 Nov in Warsaw

  it('shows only the 24-hour clock for the site’s today', () => {
    expect(formatWhen('2026-11-02T06:05:00Z', 'Europe/Warsaw', now)).toBe('07:05 (UTC+01:00)');
    expect(formatWhen('2026-11-02T22:59:00Z', 'Europe/Warsaw', now)).toBe('23:59 (UTC+01:00)');
  });

  it('puts the site’s date in front on any other site day', () => {
    expect(formatWhen('2026-11-01T17:30:00Z', 'Europe/Warsaw', now)).toBe('1 Nov 2026, 18:30 (UTC+01:00)');
    // 23:30 UTC on 2 November is already 3 November in Warsaw: not today at the site.
    expect(formatWhen('2026-11-02T23:30:00Z', 'Europe/Warsaw', now)).toBe('3 Nov 2026, 00:30 (UTC+01:00)');
  });

  it('the same moment reads differently at different sites, each with its own offset', () => {
    const at = '2026-12-03T17:04:00Z';
    const then = new Date('2026-12-03T18:00:00Z');
    expect(formatWhen(at, 'Europe/Warsaw', then)).toBe('18:04 (UTC+01:00)');
    expect(formatWhen(at, 'America/Chicago', then)).toBe('11:04 (UTC\u221206:00)');
    // 06:04 on 4 December in Auckland, while "then" is 07:00 on 4 December there: today.
    expect(formatWhen(at, 'Pacific/Auckland', then)).toBe('06:04 (UTC+13:00)');
  });

  it('hands back text it cannot read as a time', () => {
    expect(formatWhen('not a time', 'Europe/Warsaw', now)).toBe('not a time');
  });
});

describe('formatWhenParts: the clock and the offset apart, for a narrow column', () => {
  it('gives the same clock and offset as formatWhen', () => {
    const now = new Date('2026-12-03T18:00:00Z');
    expect(formatWhenParts('2026-12-03T17:04:00Z', 'America/Chicago', now)).toEqual({ when: '11:04', offset: 'UTC\u221206:00' });
    expect(formatWhenParts('2026-12-02T17:04:00Z', 'America/Chicago', now)).toEqual({ when: '2 Dec 2026, 11:04', offset: 'UTC\u221206:00' });
    expect(formatWhenParts('garbled', 'America/Chicago', now)).toEqual({ when: 'garbled', offset: '' });
  });
});

describe('formatInstant: for the record, always with the date and seconds', () => {
  it('writes the site’s date, time to the second and offset', () => {
    expect(formatInstant('2026-12-03T17:04:12.345Z', 'Europe/Warsaw')).toBe('3 Dec 2026, 18:04:12 (UTC+01:00)');
    expect(formatInstant('2026-12-03T12:30:00Z', 'Pacific/Auckland')).toBe('4 Dec 2026, 01:30:00 (UTC+13:00)');
  });
});

describe('zoneWords: the zone said once in a board header', () => {
  it('names the offset in force and the zone', () => {
    expect(zoneWords('Europe/Warsaw', new Date('2026-07-01T12:00:00Z'))).toBe('Site time UTC+02:00 (Europe/Warsaw)');
    expect(zoneWords('Europe/Warsaw', new Date('2026-12-01T12:00:00Z'))).toBe('Site time UTC+01:00 (Europe/Warsaw)');
    expect(siteTimeWords('Asia/Kolkata', new Date('2026-12-01T12:00:00Z')).words).toBe('Site time UTC+05:30');
  });
});
