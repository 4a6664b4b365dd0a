import { sameSiteDay, siteClock, siteDate, siteDateTime, siteWhen, utcOffset } from '../../shared/time';

// Every time on screen is the site's wall clock with its UTC offset (shared/time.ts), never the
// device's: a supervisor reading the board from another country sees the site's 18:04, not theirs.
// The zone is always passed in: a job's `timeZone` (the board: `board.job.timeZone`, through the
// board store's `siteTimeZone`), or the server's (`useSessionStore().serverTimeZone`) for times
// that belong to no job (fleet, people).

/** The site's 24-hour clock with its offset, with the site's date in front when it is not the site's today. */
export function formatWhen(iso: string, zone: string, now: Date = new Date()): string {
  return siteWhen(iso, zone, now);
}

/**
 * The same words as `formatWhen` in two parts, for a narrow column: the clock (with the site's date
 * when it is not the site's today) large, the offset small beneath it.
 */
export function formatWhenParts(iso: string, zone: string, now: Date = new Date()): { when: string; offset: string } {
  const offset = utcOffset(iso, zone);
  if (!offset) return { when: iso, offset: '' };
  const clock = siteClock(iso, zone);
  return { when: sameSiteDay(iso, now, zone) ? clock : `${siteDate(iso, zone)}, ${clock}`, offset };
}

/** A moment for the record: the site's date, time to the second and offset, never shortened to "today". */
export function formatInstant(iso: string, zone: string): string {
  return siteDateTime(iso, zone, { seconds: true });
}

/** The zone said once in a header: "Site time UTC+01:00 (Europe/Warsaw)". */
export function zoneWords(zone: string, now: Date = new Date()): string {
  return `Site time ${utcOffset(now, zone)} (${zone})`;
}

/** The zone for a board header: short words ("Site time UTC+01:00") and the zone's name for a tooltip. */
export function siteTimeWords(zone: string, now: Date = new Date()): { words: string; title: string } {
  return { words: `Site time ${utcOffset(now, zone)}`, title: `Every time on this board is the site's clock (${zone}) with its offset from UTC.` };
}
