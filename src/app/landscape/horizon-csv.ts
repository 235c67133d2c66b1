/** A problem on one line of an uploaded horizon survey (1-based line numbers, as an editor shows them). */
export interface CsvProblem {
  line: number;
  message: string;
}

export type HorizonCsvResult = { ok: true; points: [number, number][] } | { ok: false; problems: CsvProblem[] };

/** Splits one CSV line into fields (RFC 4180 quoting; comma separator). */
function fields(line: string): string[] {
  const out: string[] = [];
  let cur = '';
  let quoted = false;
  for (let i = 0; i < line.length; i++) {
    const c = line[i]!;
    if (quoted) {
      if (c === '"' && line[i + 1] === '"') {
        cur += '"';
        i++;
      } else if (c === '"') quoted = false;
      else cur += c;
    } else if (c === '"') quoted = true;
    else if (c === ',') {
      out.push(cur);
      cur = '';
    } else cur += c;
  }
  out.push(cur);
  return out.map((f) => f.trim());
}

const NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;

/**
 * Reads a horizon survey: one `azimuth,elevation` pair in degrees per line (azimuth clockwise from north, 0 ≤ az < 360;
 * elevation 0…90). A first line that is not numeric is taken as a header. Blank lines are skipped. Every bad line is
 * reported by its number; the points are returned (sorted by azimuth, equal azimuths kept in file order) only when
 * every line is good.
 */
export function parseHorizonCsv(text: string): HorizonCsvResult {
  const lines = text.replace(/^\uFEFF/, '').split(/\r\n|\n|\r/);
  const problems: CsvProblem[] = [];
  const points: { az: number; el: number; order: number }[] = [];
  let sawData = false;
  lines.forEach((raw, i) => {
    const line = i + 1;
    if (!raw.trim()) return;
    const f = fields(raw);
    if (!sawData && !f.some((x) => NUMBER.test(x))) {
      sawData = true; // header
      return;
    }
    sawData = true;
    if (f.length !== 2) {
      problems.push({ line, message: `expected 2 values (azimuth, elevation), found ${f.length}` });
      return;
    }
    const [a, e] = f as [string, string];
    if (!NUMBER.test(a)) return void problems.push({ line, message: `azimuth "${a}" is not a number` });
    if (!NUMBER.test(e)) return void problems.push({ line, message: `elevation "${e}" is not a number` });
    const az = Number(a);
    const el = Number(e);
    if (az < 0 || az >= 360) return void problems.push({ line, message: `azimuth ${az}° is outside 0 to 360° (360 excluded)` });
    if (el < 0 || el > 90) return void problems.push({ line, message: `elevation ${el}° is outside 0 to 90°` });
    points.push({ az, el, order: points.length });
  });
  if (!problems.length && !points.length) problems.push({ line: 1, message: 'the file has no azimuth, elevation rows' });
  if (points.length > 720) problems.push({ line: lines.length, message: `${points.length} points; at most 720 are kept per survey` });
  if (problems.length) return { ok: false, problems };
  points.sort((p, q) => p.az - q.az || p.order - q.order);
  return { ok: true, points: points.map((p) => [p.az, p.el]) };
}
