/**
 * Instants with an explicit UTC offset (ISO 8601 / RFC 3339 extended format), the only time form the engine accepts.
 * A local time without an offset is ambiguous and is rejected.
 */

/** An instant and the offset it was written in. */
export interface Instant {
  unixMs: number;
  /** Offset from UTC in minutes (east positive), e.g. −420 for −07:00. */
  offsetMinutes: number;
}

const ISO_WITH_OFFSET = /^(-?\d{4,6})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2})(\.\d{1,9})?)?(Z|z|[+-]\d{2}:?\d{2})$/;

/** Parse `2003-10-17T12:30:30-07:00`; throws a RangeError naming `field` when there is no offset or a part is out of range. */
export function parseInstant(text: string, field = 'time'): Instant {
  const m = ISO_WITH_OFFSET.exec(text.trim());
  if (!m) {
    throw new RangeError(
      `${field}: expected an ISO 8601 instant with an offset, e.g. 2003-10-17T12:30:30-07:00 or …Z; got ${JSON.stringify(text)}`,
    );
  }
  const [, y, mo, d, h, mi, s, frac, off] = m;
  const year = Number(y);
  const month = Number(mo);
  const day = Number(d);
  const hour = Number(h);
  const minute = Number(mi);
  const second = s === undefined ? 0 : Number(s);
  if (month < 1 || month > 12) throw new RangeError(`${field}: month must be 01…12`);
  const dim = new Date(Date.UTC(2000, month, 0)).getUTCDate();
  const daysInMonth = month === 2 ? (year % 4 === 0 && (year % 100 !== 0 || year % 400 === 0) ? 29 : 28) : dim;
  if (day < 1 || day > daysInMonth) throw new RangeError(`${field}: day must be 01…${daysInMonth}`);
  if (hour > 23 || minute > 59 || second > 60) throw new RangeError(`${field}: hour 00…23, minute 00…59, second 00…60`);
  let offsetMinutes = 0;
  if (off !== 'Z' && off !== 'z') {
    const sign = off!.startsWith('-') ? -1 : 1;
    const digits = off!.slice(1).replace(':', '');
    const oh = Number(digits.slice(0, 2));
    const om = Number(digits.slice(2));
    if (oh > 18 || om > 59) throw new RangeError(`${field}: offset must be within ±18:00`);
    offsetMinutes = sign * (oh * 60 + om);
  }
  const base = new Date(0);
  base.setUTCFullYear(year, month - 1, day);
  base.setUTCHours(hour, minute, Math.min(second, 59), 0);
  const fracMs = frac ? Number(frac) * 1000 : 0;
  const unixMs = base.getTime() + (second === 60 ? 1000 : 0) + fracMs - offsetMinutes * 60_000;
  return { unixMs, offsetMinutes };
}

/** Format an instant in a given offset as `YYYY-MM-DDThh:mm:ss(.sss)±hh:mm` (milliseconds rounded). */
export function formatInstant(unixMs: number, offsetMinutes: number): string {
  const local = new Date(Math.round(unixMs) + offsetMinutes * 60_000);
  const pad = (n: number, w = 2) => String(n).padStart(w, '0');
  const ms = local.getUTCMilliseconds();
  const sign = offsetMinutes < 0 ? '-' : '+';
  const a = Math.abs(offsetMinutes);
  const off = offsetMinutes === 0 ? 'Z' : `${sign}${pad(Math.floor(a / 60))}:${pad(a % 60)}`;
  return (
    `${pad(local.getUTCFullYear(), 4)}-${pad(local.getUTCMonth() + 1)}-${pad(local.getUTCDate())}` +
    `T${pad(local.getUTCHours())}:${pad(local.getUTCMinutes())}:${pad(local.getUTCSeconds())}` +
    (ms ? `.${pad(ms, 3)}` : '') +
    off
  );
}

/** Start of the local calendar day (00:00 at the offset) containing the instant, as epoch ms. */
export function localDayStartUnixMs(unixMs: number, offsetMinutes: number): number {
  const shifted = unixMs + offsetMinutes * 60_000;
  return Math.floor(shifted / 86_400_000) * 86_400_000 - offsetMinutes * 60_000;
}
