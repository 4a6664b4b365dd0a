// Site time. The offsets are the IANA time zone database's (tzdata), which both Node's and the
// browser's Intl carry; each expected value names the rule it comes from:
// - Europe/Warsaw: Central European Time UTC+01:00, summer time UTC+02:00 from 01:00 UTC on the
//   last Sunday of March to 01:00 UTC on the last Sunday of October (Directive 2000/84/EC of the
//   European Parliament and of the Council, 19 January 2001, Articles 2 and 3).
// - America/Chicago: Central Standard Time UTC−06:00; daylight time UTC−05:00 from 02:00 local on
//   the second Sunday of March to 02:00 local on the first Sunday of November (Energy Policy Act
//   of 2005, section 110, amending 15 U.S.C. 260a).
// - Asia/Kolkata: Indian Standard Time UTC+05:30 all year, no daylight time (tzdata, from memory).
// - Australia/Adelaide: Australian Central Daylight Time UTC+10:30 from the first Sunday of
//   October to the first Sunday of April (South Australia, Daylight Saving Act 1971 as amended;
//   from memory), so in December.
// - Pacific/Auckland: New Zealand Daylight Time UTC+13:00 from the last Sunday of September to the
//   first Sunday of April (New Zealand Daylight Time Order 2007; from memory), so in December.
import { describe, expect, it } from 'vitest';
import { isTimeZone, sameSiteDay, siteClock, siteDate, siteDateTime, siteTime, siteWhen, tidyTimeZone, timeZoneNames, utcOffset, utcTime } from '../../shared/time';

const MINUS = '\u2212';

describe('utcOffset: the zone offset at a moment, as published', () => {
  it('Europe/Warsaw is UTC+01:00 in December and UTC+02:00 in July (EU summer time rule)', () => {
    expect(utcOffset('2026-12-03T17:04:00Z', 'Europe/Warsaw')).toBe('UTC+01:00');
    expect(utcOffset('2026-07-03T17:04:00Z', 'Europe/Warsaw')).toBe('UTC+02:00');
  });
  it('America/Chicago is UTC−06:00 in December (Central Standard Time), written with a minus sign', () => {
    expect(utcOffset('2026-12-03T17:04:00Z', 'America/Chicago')).toBe(`UTC${MINUS}06:00`);
  });
  it('Asia/Kolkata is UTC+05:30 in winter and summer alike', () => {
    expect(utcOffset('2026-12-03T17:04:00Z', 'Asia/Kolkata')).toBe('UTC+05:30');
    expect(utcOffset('2026-07-03T17:04:00Z', 'Asia/Kolkata')).toBe('UTC+05:30');
  });
  it('Australia/Adelaide is UTC+10:30 in December (daylight time)', () => {
    expect(utcOffset('2026-12-03T17:04:00Z', 'Australia/Adelaide')).toBe('UTC+10:30');
  });
  it('Pacific/Auckland is UTC+13:00 in December (daylight time)', () => {
    expect(utcOffset('2026-12-03T17:04:00Z', 'Pacific/Auckland')).toBe('UTC+13:00');
  });
  it('UTC is UTC+00:00 (Intl writes a bare "GMT"), also for a Date', () => {
    expect(utcOffset(new Date('2026-12-03T17:04:00Z'), 'UTC')).toBe('UTC+00:00');
  });
  it('an unreadable time has no offset', () => {
    expect(utcOffset('not a time', 'Europe/Warsaw')).toBe('');
  });
});

/** Last Sunday of a month, UTC date (month 1-12): worked from the calendar, not from Intl. */
function lastSundayUtc(year: number, month: number): Date {
  const last = new Date(Date.UTC(year, month, 0)); // day 0 of the next month is the last day of this one
  return new Date(Date.UTC(year, month - 1, last.getUTCDate() - last.getUTCDay(), 1, 0, 0));
}

describe('Europe/Warsaw over a whole year against the EU rule worked independently', () => {
  it('every hour of 2026 has +02:00 exactly between the two changeovers at 01:00 UTC, +01:00 otherwise', () => {
    const start = lastSundayUtc(2026, 3);
    const end = lastSundayUtc(2026, 10);
    // Directive 2000/84/EC: 29 March 2026 and 25 October 2026 are the last Sundays (calendar).
    expect(start.toISOString()).toBe('2026-03-29T01:00:00.000Z');
    expect(end.toISOString()).toBe('2026-10-25T01:00:00.000Z');
    const wrong: string[] = [];
    for (let t = Date.UTC(2026, 0, 1); t < Date.UTC(2027, 0, 1); t += 3_600_000) {
      const expected = t >= start.getTime() && t < end.getTime() ? 'UTC+02:00' : 'UTC+01:00';
      if (utcOffset(new Date(t), 'Europe/Warsaw') !== expected) wrong.push(new Date(t).toISOString());
    }
    expect(wrong).toEqual([]);
  });
  it('the minute before and the minute of the spring change', () => {
    expect(siteTime('2026-03-29T00:59:00Z', 'Europe/Warsaw')).toBe('01:59 (UTC+01:00)');
    expect(siteTime('2026-03-29T01:00:00Z', 'Europe/Warsaw')).toBe('03:00 (UTC+02:00)');
  });
});

describe('America/Chicago at the start of daylight time, second Sunday of March 2026 (8 March)', () => {
  it('01:59 CST is followed by 03:00 CDT', () => {
    expect(siteTime('2026-03-08T07:59:00Z', 'America/Chicago')).toBe(`01:59 (UTC${MINUS}06:00)`);
    expect(siteTime('2026-03-08T08:00:00Z', 'America/Chicago')).toBe(`03:00 (UTC${MINUS}05:00)`);
  });
});

describe('siteTime and siteDateTime: the site wall clock with its offset', () => {
  it('17:04 UTC is 18:04 in Warsaw in December', () => {
    expect(siteTime('2026-12-03T17:04:12Z', 'Europe/Warsaw')).toBe('18:04 (UTC+01:00)');
    expect(siteTime('2026-12-03T17:04:12Z', 'Europe/Warsaw', { seconds: true })).toBe('18:04:12 (UTC+01:00)');
    expect(siteDateTime('2026-12-03T17:04:12Z', 'Europe/Warsaw')).toBe('3 Dec 2026, 18:04 (UTC+01:00)');
    expect(siteDateTime('2026-12-03T17:04:12Z', 'Europe/Warsaw', { seconds: true })).toBe('3 Dec 2026, 18:04:12 (UTC+01:00)');
  });
  it('half-hour zones move the minutes: 17:04 UTC is 22:34 in Kolkata', () => {
    expect(siteTime('2026-12-03T17:04:00Z', 'Asia/Kolkata')).toBe('22:34 (UTC+05:30)');
  });
  it('a time across midnight takes the site date, not the UTC date (Auckland ahead, Chicago behind)', () => {
    // 12:30 UTC on 3 December + 13 h = 01:30 on 4 December in Auckland.
    expect(siteDateTime('2026-12-03T12:30:00Z', 'Pacific/Auckland')).toBe('4 Dec 2026, 01:30 (UTC+13:00)');
    expect(siteDate('2026-12-03T12:30:00Z', 'Pacific/Auckland')).toBe('4 Dec 2026');
    // 03:00 UTC on 4 December − 6 h = 21:00 on 3 December in Chicago.
    expect(siteDateTime('2026-12-04T03:00:00Z', 'America/Chicago')).toBe(`3 Dec 2026, 21:00 (UTC${MINUS}06:00)`);
  });
  it('siteClock is the clock alone, for lists that write the offset once', () => {
    expect(siteClock('2026-12-03T17:04:12Z', 'Europe/Warsaw')).toBe('18:04');
    expect(siteClock('2026-12-03T17:04:12Z', 'Asia/Kolkata', { seconds: true })).toBe('22:34:12');
  });
  it('midnight is 00:00, never 24:00', () => {
    expect(siteTime('2026-12-03T23:00:00Z', 'Europe/Warsaw')).toBe('00:00 (UTC+01:00)');
  });
  it('September is "Sep" whatever the ICU version says', () => {
    expect(siteDate('2026-09-15T12:00:00Z', 'UTC')).toBe('15 Sep 2026');
  });
  it('an unreadable time is shown as given; an unknown zone falls back to UTC and says so', () => {
    expect(siteTime('soon', 'Europe/Warsaw')).toBe('soon');
    expect(siteDateTime('2026-12-03T17:04:00Z', 'Mars/Olympus')).toBe('3 Dec 2026, 17:04 (UTC+00:00)');
  });
  it('utcTime keeps the UTC clock for records that carry both', () => {
    expect(utcTime('2026-12-03T17:04:12Z')).toBe('17:04 UTC');
    expect(utcTime('2026-12-03T17:04:12Z', { seconds: true })).toBe('17:04:12 UTC');
  });
});

describe('siteWhen: the date only when it is not the site’s today', () => {
  it('same site day: the clock alone; another site day: the date too', () => {
    const now = new Date('2026-12-03T20:00:00Z'); // 09:00 on 4 December in Auckland
    expect(siteWhen('2026-12-03T12:30:00Z', 'Pacific/Auckland', now)).toBe('01:30 (UTC+13:00)');
    // Same UTC day, but 3 December in Auckland while "now" is already 4 December there.
    expect(siteWhen('2026-12-03T10:00:00Z', 'Pacific/Auckland', now)).toBe('3 Dec 2026, 23:00 (UTC+13:00)');
    expect(sameSiteDay('2026-12-03T10:00:00Z', now, 'UTC')).toBe(true);
    expect(sameSiteDay('2026-12-03T10:00:00Z', now, 'Pacific/Auckland')).toBe(false);
  });
});

describe('zone names', () => {
  it('accepts IANA names Intl knows and refuses others', () => {
    expect(isTimeZone('Europe/Warsaw')).toBe(true);
    expect(isTimeZone('UTC')).toBe(true);
    expect(isTimeZone('Mars/Olympus')).toBe(false);
    expect(isTimeZone('')).toBe(false);
    expect(isTimeZone('+01:00')).toBe(false);
  });
  it('offers UTC first and the named zones after', () => {
    const names = timeZoneNames();
    expect(names[0]).toBe('UTC');
    expect(names).toContain('Pacific/Auckland');
    expect(names.filter((n) => n === 'UTC')).toHaveLength(1);
  });
  it('writes a zone typed in another case the usual way', () => {
    expect(tidyTimeZone(' europe/warsaw ')).toBe('Europe/Warsaw');
    expect(tidyTimeZone('utc')).toBe('UTC');
  });
  it('offers the current names of renamed zones, each one Intl accepts (IANA "backward" links, from memory)', () => {
    const names = timeZoneNames();
    expect(names).toContain('Asia/Kolkata');
    expect(names).toContain('Europe/Kyiv');
    expect(names).not.toContain('Asia/Calcutta');
    expect(names.filter((n) => !isTimeZone(n))).toEqual([]);
    expect(new Set(names).size).toBe(names.length);
    expect(tidyTimeZone('Asia/Calcutta')).toBe('Asia/Kolkata');
    expect(tidyTimeZone('europe/kiev')).toBe('Europe/Kyiv');
    // Both names mean the same offsets (Kolkata UTC+05:30).
    expect(utcOffset('2026-12-03T12:00:00Z', 'Asia/Kolkata')).toBe(utcOffset('2026-12-03T12:00:00Z', 'Asia/Calcutta'));
  });
});
