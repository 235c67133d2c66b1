/**
 * Calendar months and days in a site's IANA time zone, for monthly statements: the UTC window of a local month and of
 * each of its days, and the month's length in hours (a month with a daylight-saving change has 743 or 745 hours: in
 * Europe/Berlin, March 2026 loses its 02:00–03:00 on the 29th and October 2026 repeats 02:00–03:00 on the 25th; common
 * practice, job.md §5 "compute daily and monthly rollups in the site's local calendar"). Uses the ECMAScript Intl
 * time-zone data; no clock.
 */

const formatters = new Map<string, Intl.DateTimeFormat>();

function formatter(timeZone: string): Intl.DateTimeFormat {
  let f = formatters.get(timeZone);
  if (!f) {
    try {
      f = new Intl.DateTimeFormat('en-US', {
        timeZone,
        hourCycle: 'h23',
        year: 'numeric',
        month: '2-digit',
        day: '2-digit',
        hour: '2-digit',
        minute: '2-digit',
        second: '2-digit',
      });
    } catch {
      throw new RangeError(`timeZone: not an IANA time zone; got ${JSON.stringify(timeZone)}`);
    }
    formatters.set(timeZone, f);
  }
  return f;
}

/** Offset of a zone from UTC at an instant [ms] (local wall time − UTC). */
export function zoneOffsetMs(utcMs: number, timeZone: string): number {
  const parts = Object.fromEntries(
    formatter(timeZone)
      .formatToParts(utcMs)
      .map((p) => [p.type, p.value]),
  );
  const wall = Date.UTC(+parts.year!, +parts.month! - 1, +parts.day!, +parts.hour!, +parts.minute!, +parts.second!);
  return wall - Math.floor(utcMs / 1000) * 1000;
}

/** The UTC instant of local midnight starting a calendar date (YYYY-MM-DD) in a zone. */
export function localMidnightUtcMs(date: string, timeZone: string): number {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(date);
  if (!m) throw new RangeError(`date: must be YYYY-MM-DD; got ${JSON.stringify(date)}`);
  const wall = Date.UTC(+m[1]!, +m[2]! - 1, +m[3]!);
  // Two fixed-point steps find the offset in force at that midnight (DST changes happen at night, never at 00:00 in
  // the zones we know of; where one did, the first instant of the day is taken).
  let t = wall - zoneOffsetMs(wall, timeZone);
  t = wall - zoneOffsetMs(t, timeZone);
  return t;
}

/** Parses a calendar month YYYY-MM (throws a RangeError naming it). */
export function parseMonth(month: string): { year: number; month: number } {
  const m = /^(\d{4})-(0[1-9]|1[0-2])$/.exec(month);
  if (!m) throw new RangeError(`month: must be a calendar month YYYY-MM; got ${JSON.stringify(month)}`);
  return { year: +m[1]!, month: +m[2]! };
}

export function nextMonthOf(month: string): string {
  const { year, month: m } = parseMonth(month);
  return m === 12 ? `${year + 1}-01` : `${year}-${String(m + 1).padStart(2, '0')}`;
}

export function previousMonthOf(month: string): string {
  const { year, month: m } = parseMonth(month);
  return m === 1 ? `${year - 1}-12` : `${year}-${String(m - 1).padStart(2, '0')}`;
}

export interface LocalDay {
  date: string;
  fromMs: number;
  toMs: number;
  /** Length of the local day [h]: 24, or 23/25 on a daylight-saving change. */
  hours: number;
}

export interface LocalMonth {
  month: string;
  timeZone: string;
  fromMs: number;
  toMs: number;
  hours: number;
  days: LocalDay[];
}

/** A calendar month in a zone: its UTC window, its length in hours and its days. */
export function localMonth(month: string, timeZone: string): LocalMonth {
  const { year, month: m } = parseMonth(month);
  const nDays = new Date(Date.UTC(year, m, 0)).getUTCDate();
  const dates = Array.from({ length: nDays }, (_, i) => `${month}-${String(i + 1).padStart(2, '0')}`);
  const starts = [...dates, `${nextMonthOf(month)}-01`].map((d) => localMidnightUtcMs(d, timeZone));
  const days = dates.map((date, i) => ({
    date,
    fromMs: starts[i]!,
    toMs: starts[i + 1]!,
    hours: (starts[i + 1]! - starts[i]!) / 3_600_000,
  }));
  return { month, timeZone, fromMs: starts[0]!, toMs: starts[nDays]!, hours: (starts[nDays]! - starts[0]!) / 3_600_000, days };
}

/** Hours in a local calendar month (743 or 745 across a daylight-saving change). */
export const hoursInLocalMonth = (month: string, timeZone: string) => localMonth(month, timeZone).hours;

/** The local calendar month (YYYY-MM) of an instant in a zone. */
export function monthOfInstant(utcMs: number, timeZone: string): string {
  const parts = Object.fromEntries(
    formatter(timeZone)
      .formatToParts(utcMs)
      .map((p) => [p.type, p.value]),
  );
  return `${parts.year}-${parts.month}`;
}

/** ISO 8601 with the zone's offset at that instant, e.g. 2026-03-29T03:00:00+02:00. */
export function isoWithOffset(utcMs: number, timeZone: string): string {
  const off = zoneOffsetMs(utcMs, timeZone);
  const local = new Date(utcMs + off).toISOString().slice(0, 19);
  const sign = off < 0 ? '-' : '+';
  const a = Math.abs(off) / 60_000;
  return `${local}${sign}${String(Math.floor(a / 60)).padStart(2, '0')}:${String(a % 60).padStart(2, '0')}`;
}
