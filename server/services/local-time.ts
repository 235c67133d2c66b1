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
