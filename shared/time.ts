/**
 * Site time: every time a person reads (screens, e-mails, PDFs) is the wall clock of the job's
 * site, in its IANA time zone, with the UTC offset written beside it, so a record read in another
 * country is not misread. Pure: only `Intl`, which both Node and the browser carry.
 *
 * Month names are our own list and the numbers come from `formatToParts`, so the words do not
 * change with the ICU version ("Sep" vs "Sept").
 */

const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'] as const;

/** The zone a bad or missing name falls back to; the offset written beside every time keeps it truthful. */
export const FALLBACK_TIME_ZONE = 'UTC';

/** Whether `Intl` knows this IANA zone name (the check the job schema makes). */
export function isTimeZone(zone: string): boolean {
  if (!zone || zone.length > 64) return false;
  try {
    new Intl.DateTimeFormat('en', { timeZone: zone });
    return true;
  } catch {
    return false;
  }
}

/**
 * Zones the IANA database has renamed (its "backward" links, from memory) that ICU's list still
 * gives under the old name: a planner typing "Kolkata" or "Kyiv" must find their site. The current
 * name is offered wherever the runtime accepts it.
 */
const RENAMED_ZONES: Readonly<Record<string, string>> = {
  'Asia/Calcutta': 'Asia/Kolkata',
  'Europe/Kiev': 'Europe/Kyiv',
  'Asia/Saigon': 'Asia/Ho_Chi_Minh',
  'Asia/Katmandu': 'Asia/Kathmandu',
  'Asia/Rangoon': 'Asia/Yangon',
  'America/Godthab': 'America/Nuuk',
  'Atlantic/Faeroe': 'Atlantic/Faroe',
  'Pacific/Enderbury': 'Pacific/Kanton',
  'Pacific/Truk': 'Pacific/Chuuk',
  'Pacific/Ponape': 'Pacific/Pohnpei',
  'Africa/Asmera': 'Africa/Asmara',
  'America/Buenos_Aires': 'America/Argentina/Buenos_Aires',
  'America/Catamarca': 'America/Argentina/Catamarca',
  'America/Cordoba': 'America/Argentina/Cordoba',
  'America/Jujuy': 'America/Argentina/Jujuy',
  'America/Mendoza': 'America/Argentina/Mendoza',
  'America/Indianapolis': 'America/Indiana/Indianapolis',
  'America/Louisville': 'America/Kentucky/Louisville',
};

let names: string[] | null = null;

/** Every zone name a person can pick, sorted, with UTC first (Intl's list leaves it out) and current names for renamed zones. */
export function timeZoneNames(): string[] {
  if (!names) {
    const listed = typeof Intl.supportedValuesOf === 'function' ? Intl.supportedValuesOf('timeZone') : [];
    const current = listed.filter((z) => z !== 'UTC').map((z) => (RENAMED_ZONES[z] && isTimeZone(RENAMED_ZONES[z]) ? RENAMED_ZONES[z] : z));
    names = ['UTC', ...[...new Set(current)].sort()];
  }
  return [...names];
}

/** The zone's usual spelling when a person typed it in another case ("europe/warsaw") or an old name ("Asia/Calcutta"); otherwise as given. */
export function tidyTimeZone(zone: string): string {
  const trimmed = zone.trim();
  const lower = trimmed.toLowerCase();
  const renamed = Object.entries(RENAMED_ZONES).find(([old]) => old.toLowerCase() === lower)?.[1];
  if (renamed && isTimeZone(renamed)) return renamed;
  return timeZoneNames().find((z) => z.toLowerCase() === lower) ?? trimmed;
}

interface WallClock {
  year: number;
  month: number;
  day: number;
  hour: string;
  minute: string;
  second: string;
  offset: string;
}

const formatters = new Map<string, Intl.DateTimeFormat>();

function formatterFor(zone: string): Intl.DateTimeFormat {
  let formatter = formatters.get(zone);
  if (!formatter) {
    formatter = new Intl.DateTimeFormat('en-GB', {
      timeZone: isTimeZone(zone) ? zone : FALLBACK_TIME_ZONE,
      year: 'numeric',
      month: 'numeric',
      day: 'numeric',
      hour: '2-digit',
      minute: '2-digit',
      second: '2-digit',
      hourCycle: 'h23',
      timeZoneName: 'longOffset',
    });
    formatters.set(zone, formatter);
  }
  return formatter;
}

/** "GMT+01:00" → "UTC+01:00"; "GMT" (zero offset) → "UTC+00:00"; a minus sign, not a hyphen. */
function offsetWords(gmt: string): string {
  const sign = gmt.replace(/^GMT/, '');
  if (sign === '') return 'UTC+00:00';
  return `UTC${sign.replace('-', '\u2212')}`;
}

function toDate(at: string | Date): Date | null {
  const date = typeof at === 'string' ? new Date(at) : at;
  return Number.isNaN(date.getTime()) ? null : date;
}

function wallClock(date: Date, zone: string): WallClock {
  const parts = formatterFor(zone).formatToParts(date);
  const part = (type: Intl.DateTimeFormatPartTypes) => parts.find((p) => p.type === type)?.value ?? '';
  return {
    year: Number(part('year')),
    month: Number(part('month')),
    day: Number(part('day')),
    hour: part('hour'),
    minute: part('minute'),
    second: part('second'),
    offset: offsetWords(part('timeZoneName')),
  };
}

export interface SiteTimeOptions {
  /** Seconds too, for the record ("18:04:12"). */
  seconds?: boolean;
}

function clockWords(w: WallClock, options: SiteTimeOptions): string {
  return options.seconds ? `${w.hour}:${w.minute}:${w.second}` : `${w.hour}:${w.minute}`;
}

function dateWords(w: WallClock): string {
  return `${w.day} ${MONTHS[w.month - 1]} ${w.year}`;
}

/** The zone's offset from UTC at that moment: "UTC+01:00", "UTC−06:00", "UTC+05:30". An unreadable time → "". */
export function utcOffset(at: string | Date, zone: string): string {
  const date = toDate(at);
  return date ? wallClock(date, zone).offset : '';
}

/** The site's 24-hour clock with its offset: "18:04 (UTC+01:00)". An unreadable time is returned as given. */
export function siteTime(at: string | Date, zone: string, options: SiteTimeOptions = {}): string {
  const date = toDate(at);
  if (!date) return String(at);
  const w = wallClock(date, zone);
  return `${clockWords(w, options)} (${w.offset})`;
}

/** The site's date and clock with its offset: "3 Dec 2026, 18:04 (UTC+01:00)". */
export function siteDateTime(at: string | Date, zone: string, options: SiteTimeOptions = {}): string {
  const date = toDate(at);
  if (!date) return String(at);
  const w = wallClock(date, zone);
  return `${dateWords(w)}, ${clockWords(w, options)} (${w.offset})`;
}

/** The site's clock alone, for a list whose offset is written beside it or once above it: "18:04". */
export function siteClock(at: string | Date, zone: string, options: SiteTimeOptions = {}): string {
  const date = toDate(at);
  return date ? clockWords(wallClock(date, zone), options) : String(at);
}

/** The site's calendar date: "3 Dec 2026". */
export function siteDate(at: string | Date, zone: string): string {
  const date = toDate(at);
  return date ? dateWords(wallClock(date, zone)) : String(at);
}

/** Whether two moments fall on the same calendar day at the site (not in UTC, not on the device). */
export function sameSiteDay(a: string | Date, b: string | Date, zone: string): boolean {
  const x = toDate(a);
  const y = toDate(b);
  if (!x || !y) return false;
  const wx = wallClock(x, zone);
  const wy = wallClock(y, zone);
  return wx.year === wy.year && wx.month === wy.month && wx.day === wy.day;
}

/** For screens: the site's clock with its offset, with the site's date in front when it is not the site's today. */
export function siteWhen(at: string | Date, zone: string, now: Date = new Date()): string {
  const date = toDate(at);
  if (!date) return String(at);
  return sameSiteDay(date, now, zone) ? siteTime(date, zone) : siteDateTime(date, zone);
}

/** "UTC" clock for records that keep both: "17:04 UTC". */
export function utcTime(at: string | Date, options: SiteTimeOptions = {}): string {
  const date = toDate(at);
  if (!date) return String(at);
  const iso = date.toISOString();
  return `${options.seconds ? iso.slice(11, 19) : iso.slice(11, 16)} UTC`;
}
