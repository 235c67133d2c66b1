import type { Unit } from '../../shared/contracts/api';
import { eventWords, UNIT_MODE_WORDS } from '../../shared/contracts/plain-words';
import {
  MAX_CSV_DAYS,
  TRACE_QUANTITIES,
  TRACE_QUANTITY_INFO,
  type TraceMark,
  type TraceQuantity,
  type TraceSeries,
  type UnitTraces,
} from '../../shared/contracts/traces';
import type { BucketRow, TraceRepository, RawTraceRecord } from '../data/trace-repository';
import { badRequest } from '../errors/app-error';
import { csvLine } from '../../shared/csv/csv-field';

const DAY_MS = 86_400_000;
const MINUTE_MS = 60_000;
/** Minutes younger than this may not be rolled up yet (a minute closes, then waits a few seconds) [ms]. */
const ROLLUP_LAG_MS = 3 * MINUTE_MS;
/** Largest range of one traces request [days]. */
export const MAX_TRACE_DAYS = 92;
/** Instants at which the modelled best is evaluated over a range, at most. */
const BEST_SAMPLES = 96;

const round2 = (x: number | null) => (x === null ? null : Math.round(x * 100) / 100);

/** The modelled best in-plane irradiance of a site at an instant (a landscape's global maximum). */
export type ModelledBest = (siteId: number, atMs: number) => Promise<number>;

/** Quantities and columns of the CSV export, in column order after `timestamp_utc`. */
const CSV_COLUMNS: { name: string; value: (r: RawTraceRecord) => string | number }[] = [
  { name: 'mode', value: (r) => r.mode },
  { name: TRACE_QUANTITY_INFO.tiltPlusWm2.csv, value: (r) => r.tiltPlusWm2 },
  { name: TRACE_QUANTITY_INFO.tiltMinusWm2.csv, value: (r) => r.tiltMinusWm2 },
  { name: TRACE_QUANTITY_INFO.azimuthPlusWm2.csv, value: (r) => r.azimuthPlusWm2 },
  { name: TRACE_QUANTITY_INFO.azimuthMinusWm2.csv, value: (r) => r.azimuthMinusWm2 },
  { name: TRACE_QUANTITY_INFO.tiltDiffWm2.csv, value: (r) => round(r.tiltPlusWm2 - r.tiltMinusWm2) },
  { name: TRACE_QUANTITY_INFO.azimuthDiffWm2.csv, value: (r) => round(r.azimuthPlusWm2 - r.azimuthMinusWm2) },
  { name: TRACE_QUANTITY_INFO.poaWm2.csv, value: (r) => r.poaWm2 },
  { name: TRACE_QUANTITY_INFO.tiltDeg.csv, value: (r) => r.tiltDeg },
  { name: TRACE_QUANTITY_INFO.cmdTiltDeg.csv, value: (r) => r.cmdTiltDeg },
  { name: TRACE_QUANTITY_INFO.azimuthDeg.csv, value: (r) => r.azimuthDeg },
  { name: TRACE_QUANTITY_INFO.cmdAzimuthDeg.csv, value: (r) => r.cmdAzimuthDeg },
  { name: 'tilt_motor_current_A', value: (r) => r.tiltMotorA },
  { name: 'azimuth_motor_current_A', value: (r) => r.azimuthMotorA },
  { name: TRACE_QUANTITY_INFO.dcPowerW.csv, value: (r) => r.dcPowerW },
  { name: 'module_temperature_C', value: (r) => r.moduleTempC },
];

function round(x: number): number {
  return Math.round(x * 1000) / 1000;
}

export function csvHeader(): string {
  return csvLine(['timestamp_utc', ...CSV_COLUMNS.map((c) => c.name)]);
}

export function csvRow(r: RawTraceRecord): string {
  return csvLine([r.ts.toISOString(), ...CSV_COLUMNS.map((c) => c.value(r))]);
}

/** Validates a trace range; returns it as dates. */
export function checkRange(fromIso: string, toIso: string, maxDays: number): { from: Date; to: Date } {
  const from = new Date(fromIso);
  const to = new Date(toIso);
  if (!(from < to)) throw badRequest('The range is empty.', { to: 'Must be after from.' });
  if (to.getTime() - from.getTime() > maxDays * DAY_MS)
    throw badRequest(`Choose at most ${maxDays} days.`, { to: `Must be within ${maxDays} days of from.` });
  return { from, to };
}

/** Downsampled traces for the explorer and the raw rows for export. */
export class TraceService {
  constructor(
    private readonly repo: TraceRepository,
    private readonly best?: ModelledBest,
    private readonly now: () => number = Date.now,
  ) {}

  /** Min/max per bucket of every quantity over [from, to), with `points` buckets at most, and the overlays. */
  async traces(unit: Unit, requestedFrom: Date, to: Date, points: number): Promise<UnitTraces> {
    const spanMs = to.getTime() - requestedFrom.getTime();
    // Whole seconds (at least 1 s), so bucket edges are easy to read and the count never exceeds `points`.
    let bucketMs = Math.max(1000, Math.ceil(spanMs / points / 1000) * 1000);
    let from = requestedFrom;
    let source: UnitTraces['source'] = 'raw';
    let buckets: Promise<BucketRow[]>;
    if (bucketMs >= MINUTE_MS) {
      // Buckets of whole minutes read the 1-minute rollup (with per-minute extremes), except the latest minutes, which
      // the rollup has not closed yet and are read raw; both land in the same buckets and are merged.
      bucketMs = Math.ceil(bucketMs / MINUTE_MS) * MINUTE_MS;
      from = new Date(Math.floor(requestedFrom.getTime() / MINUTE_MS) * MINUTE_MS);
      const split = new Date(
        Math.min(to.getTime(), Math.max(from.getTime(), Math.floor((this.now() - ROLLUP_LAG_MS) / MINUTE_MS) * MINUTE_MS)),
      );
      source = split < to ? 'rollup+raw' : 'rollup';
      buckets = Promise.all([
        this.repo.bucketsFromMinutes(unit.id, from, from, split, bucketMs, TRACE_QUANTITIES),
        split < to ? this.repo.buckets(unit.id, split, to, bucketMs, TRACE_QUANTITIES, 1, from) : Promise.resolve([]),
      ]).then(([a, b]) => mergeBuckets(a, b));
    } else {
      buckets = this.repo.buckets(unit.id, from, to, bucketMs, TRACE_QUANTITIES, spanMs > 2 * DAY_MS ? 4 : 1);
    }
    const [rows, events, alarms, modelledBest] = await Promise.all([
      buckets,
      this.repo.events(unit.id, from, to),
      this.repo.alarms(unit.id, from, to),
      this.modelledBest(unit.siteId, from, to),
    ]);
    const series = Object.fromEntries(TRACE_QUANTITIES.map((q) => [q, { min: [], max: [] } as TraceSeries])) as Record<
      TraceQuantity,
      TraceSeries
    >;
    const t: number[] = [];
    const samples: number[] = [];
    let total = 0;
    for (const r of rows) {
      t.push(from.getTime() + Number(r.b) * bucketMs);
      const n = Number(r.n);
      samples.push(n);
      total += n;
      for (const q of TRACE_QUANTITIES) {
        series[q].min.push(round2(r[`${q}_lo`] === null ? null : Number(r[`${q}_lo`])));
        series[q].max.push(round2(r[`${q}_hi`] === null ? null : Number(r[`${q}_hi`])));
      }
    }
    return {
      unitId: unit.id,
      serial: unit.serial,
      from: from.toISOString(),
      to: to.toISOString(),
      bucketMs,
      t,
      samples,
      series,
      rows: total,
      source,
      events: events.map((e) => ({ at: e.ts.toISOString(), kind: e.kind, text: eventText(e.kind, parseBody(e.body)) })),
      alarms: alarms.map(alarmMark),
      modelledBest,
    };
  }

  /** Streams the raw rows of [from, to) as RFC 4180 CSV (CRLF, header first), page by page. */
  async *csv(unit: Unit, from: Date, to: Date, pageRows = 5000): AsyncGenerator<string> {
    yield csvHeader();
    let after = from;
    let inclusive = true;
    for (;;) {
      const page = await this.repo.rawPage(unit.id, after, to, pageRows, inclusive);
      if (!page.length) return;
      yield page.map(csvRow).join('');
      if (page.length < pageRows) return;
      after = page[page.length - 1]!.ts;
      inclusive = false;
    }
  }

  static readonly maxCsvDays = MAX_CSV_DAYS;

  private async modelledBest(siteId: number, from: Date, to: Date): Promise<UnitTraces['modelledBest']> {
    if (!this.best) return { t: [], wm2: [] };
    const span = to.getTime() - from.getTime();
    // Every 15 minutes for short ranges; evenly spread (at most BEST_SAMPLES) for long ones.
    const step = Math.max(15 * 60_000, Math.ceil(span / BEST_SAMPLES / 60_000) * 60_000);
    const first = Math.ceil(from.getTime() / step) * step;
    const t: number[] = [];
    for (let x = first; x < to.getTime(); x += step) t.push(x);
    try {
      // One slot after another: a cold day is ~100 landscapes, and asking for all at once would queue every other
      // request behind them for the event loop and the connection pool.
      const wm2: number[] = [];
      for (const x of t) wm2.push(await this.best(siteId, x));
      return { t, wm2 };
    } catch {
      return { t: [], wm2: [] };
    }
  }
}

function parseBody(body: unknown): Record<string, unknown> {
  if (typeof body === 'string') {
    try {
      return JSON.parse(body) as Record<string, unknown>;
    } catch {
      return {};
    }
  }
  return (body ?? {}) as Record<string, unknown>;
}

/** An event in words: "Mode changed → Scanning", "Fault · TILT_DRIVE · …" (a fault code stays the unit's own). */
function eventText(kind: string, b: Record<string, unknown>): string {
  const parts = [eventWords(kind)];
  if (typeof b['mode'] === 'string')
    parts[0] += ` → ${(UNIT_MODE_WORDS as Partial<Record<string, { label: string }>>)[b['mode']]?.label ?? 'another mode'}`;
  if (typeof b['code'] === 'string') parts.push(String(b['code']));
  if (typeof b['message'] === 'string') parts.push(String(b['message']));
  return parts.join(' · ');
}

function alarmMark(a: { raisedAt: Date; kind: string; severity: string; message: string }): TraceMark {
  return { at: a.raisedAt.toISOString(), kind: a.kind, text: `${a.message} (${a.severity})` };
}

/** Merges bucket rows of the same index from two sources: smallest minimum, largest maximum, samples added. */
export function mergeBuckets(a: BucketRow[], b: BucketRow[]): BucketRow[] {
  const byIndex = new Map<number, BucketRow>();
  for (const r of [...a, ...b]) {
    const k = Number(r.b);
    const prev = byIndex.get(k);
    if (!prev) {
      byIndex.set(k, { ...r, b: k, n: Number(r.n) });
      continue;
    }
    prev.n = Number(prev.n) + Number(r.n);
    for (const q of TRACE_QUANTITIES) {
      const lo = [prev[`${q}_lo`], r[`${q}_lo`]].filter((x): x is number => x !== null && x !== undefined).map(Number);
      const hi = [prev[`${q}_hi`], r[`${q}_hi`]].filter((x): x is number => x !== null && x !== undefined).map(Number);
      prev[`${q}_lo`] = lo.length ? Math.min(...lo) : null;
      prev[`${q}_hi`] = hi.length ? Math.max(...hi) : null;
    }
  }
  return [...byIndex.values()].sort((x, y) => x.b - y.b);
}
