/**
 * CSV as every Brightward export writes it: RFC 4180 (comma separator, CRLF line ends, a field quoted when it holds a
 * comma, a double quote or a line break, quotes doubled inside), with text cells neutralised against spreadsheet
 * formulas: a text cell starting with `=`, `+`, `-`, `@`, a tab or a carriage return gets a leading single quote, so a
 * spreadsheet shows it as text instead of running it (formula or "CSV injection", OWASP). Numbers are written as
 * numbers (a negative value stays `-3.2`): only text can carry a formula, and only typed numbers count as numbers, so a
 * string that looks like one is still neutralised. Missing values (null, undefined, NaN, ±Infinity) are empty cells.
 *
 * Pure: used by the server's exports and by any CSV the dashboard writes.
 */

/** Characters that make a spreadsheet read a cell as a formula (or, tab and CR, hide one after them). */
const FORMULA_START = /^[=+\-@\t\r]/;
const NEEDS_QUOTES = /[",\r\n]/;

export type CsvValue = string | number | null | undefined;

/** One field, neutralised and quoted as needed. */
export function csvField(v: CsvValue): string {
  if (v === null || v === undefined) return '';
  if (typeof v === 'number') return Number.isFinite(v) ? String(v) : '';
  const s = FORMULA_START.test(v) ? `'${v}` : v;
  return NEEDS_QUOTES.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** One record: fields joined by commas, ended by CRLF. */
export function csvLine(values: readonly CsvValue[]): string {
  return values.map(csvField).join(',') + '\r\n';
}
