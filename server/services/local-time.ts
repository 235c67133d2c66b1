/** Local calendar dates of UTC instants in an IANA zone (Intl; DST-safe). */
const formatters = new Map<string, Intl.DateTimeFormat>();

export function localDate(epochMs: number, timeZone: string): string {
  let f = formatters.get(timeZone);
  if (!f) {
    f = new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' });
    formatters.set(timeZone, f);
  }
  return f.format(epochMs); // en-CA formats as YYYY-MM-DD
}

/** A UTC window that surely contains the whole local day (zones are within UTC−12…UTC+14). */
export function utcWindowOfLocalDate(date: string): { from: Date; to: Date } {
  const midnightUtc = Date.parse(`${date}T00:00:00Z`);
  return { from: new Date(midnightUtc - 14 * 3600_000), to: new Date(midnightUtc + 36 * 3600_000) };
}

const wallFormatters = new Map<string, Intl.DateTimeFormat>();

/** How far a zone's wall clock is ahead of UTC at an instant [ms]. */
function zoneOffsetMs(epochMs: number, timeZone: string): number {
  let f = wallFormatters.get(timeZone);
  if (!f) {
    f = new Intl.DateTimeFormat('en-US', {
      timeZone,
      hourCycle: 'h23',
      year: 'numeric',
      month: 'numeric',
      day: 'numeric',
      hour: 'numeric',
      minute: 'numeric',
      second: 'numeric',
    });
    wallFormatters.set(timeZone, f);
  }
  const p = Object.fromEntries(f.formatToParts(epochMs).map((x) => [x.type, Number(x.value)]));
  const wall = Date.UTC(p['year']!, p['month']! - 1, p['day']!, p['hour']!, p['minute']!, p['second']!);
  return wall - Math.floor(epochMs / 1000) * 1000;
}

/**
 * The instant at which a zone's wall clock shows a time (given as if it were UTC, e.g. a camera's clock), by the zone's
 * offset at that time (a wall time that a DST change skips or repeats gets the offset in force just after it).
 */
export function instantOfWallTime(wallAsUtcMs: number, timeZone: string): number {
  const first = wallAsUtcMs - zoneOffsetMs(wallAsUtcMs, timeZone);
  return wallAsUtcMs - zoneOffsetMs(first, timeZone);
}
