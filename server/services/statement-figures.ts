/**
 * The arithmetic of a monthly statement, from a site's 15-minute rollups, tickets and alarms (pure: no I/O, no clock).
 * Definitions, in the statement's own words (README "Monthly statements"):
 * - energy is the units' DC energy; Hi the in-plane irradiation their own sensors measured over the minutes they
 *   reported; Yf, Yr, PR and PR_STC after IEC 61724-1 (shared/pv-performance/yields-iec-61724-1.ts);
 * - daylight is a bucket whose modelled best in-plane irradiance (else the brightest unit's measured one, else the
 *   Haurwitz clear-sky GHI at an approximate solar zenith) reaches DAYLIGHT_THRESHOLD_WM2; availability counts daylight only;
 * - downtime of a bucket: missing minutes (comms), stowed, held and fault minutes as the unit reported them, and the
 *   producing minutes under an active stall alarm. Its category: a ticket covering the bucket (unit or whole site) wins
 *   unless the ticket's category is an in-service one; else wind stow = out of environmental specification, a hold =
 *   scheduled maintenance, comms/stall/fault = forced outage (IEC TS 63019 categories);
 * - "at best" energy over producing minutes = measured × modelled best ÷ modelled at the unit's orientation; over
 *   non-producing minutes = site median PR × P0 × modelled best irradiance × time. Twins likewise with their own
 *   modelled irradiance (the issue's ratio method: model bias cancels);
 * - losses (modelled buckets only): trapped = the orientation gap of buckets where the unit was mostly settled below
 *   TRAP_RATIO of the best; downtime, held and stowed = the "at best" energy of those minutes (stall: also the
 *   orientation gap); soiling estimate = under an active soiling alarm, median PR × P0 × Hi − measured; residual =
 *   modelled − measured − the named parts, so the parts add up.
 */
import { clearSkyGhiHaurwitz } from '../../shared/clear-sky';
import { TRAP_RATIO } from '../../shared/landscape';
import {
  availabilityOf,
  EXCUSED_CATEGORIES,
  IN_SERVICE_CATEGORIES,
  isoWithOffset,
  temperatureFactor,
  type AvailabilityPeriod,
  type LocalMonth,
} from '../../shared/pv-performance';
import { declinationCooperDeg, equationOfTimeSpencerMin } from '../../shared/solar-position';
import type { AvailabilityCategory } from '../../shared/contracts/tickets';
import type {
  ExclusionSource,
  StatementAvailability,
  StatementDay,
  StatementExclusion,
  StatementFigures,
  StatementUnit,
} from '../../shared/contracts/statements';
import {
  QUARTER_MS,
  type StatementAlarm,
  type StatementColumns,
  type StatementTicket,
  type StatementUnit as UnitRow,
} from '../data/statement-repository';

/** In-plane irradiance above which a bucket is daylight (counts for availability) [W/m²]; common practice. */
export const DAYLIGHT_THRESHOLD_WM2 = 50;

export interface StatementInput {
  site: { latitudeDeg: number; longitudeDeg: number; elevationM: number; timeZone: string };
  month: LocalMonth;
  /** Buckets before this instant count (the month so far) [ms]. */
  untilMs: number;
  units: readonly UnitRow[];
  /** The month's 15-minute rows of the units (StatementRepository.quarterColumns over [month.fromMs, month.toMs)). */
  columns: StatementColumns;
  tickets: readonly StatementTicket[];
  alarms: readonly StatementAlarm[];
  gammaPerK: number;
}

export interface StatementResult {
  site: StatementFigures;
  units: StatementUnit[];
  days: StatementDay[];
  exclusions: StatementExclusion[];
  medianPr: number | null;
}

interface Sums {
  energyKwh: number;
  p0Kwp: number;
  p0HiKwh: number;
  minutes: number;
  expectedMinutes: number;
  prStcNum: number;
  prStcDen: number;
  daylightBuckets: number;
  modelledDaylightBuckets: number;
  /** Daylight availability periods summed per downtime category ('up' = available): availability only sums them. */
  periods: Map<AvailabilityCategory | 'up', AvailabilityPeriod>;
  modelledBest: number;
  measuredModelled: number;
  trapped: number;
  downtime: number;
  held: number;
  stowed: number;
  soiling: number;
  fixedTwin: number;
  sunTwin: number;
}

const emptySums = (): Sums => ({
  energyKwh: 0,
  p0Kwp: 0,
  p0HiKwh: 0,
  minutes: 0,
  expectedMinutes: 0,
  prStcNum: 0,
  prStcDen: 0,
  daylightBuckets: 0,
  modelledDaylightBuckets: 0,
  periods: new Map(),
  modelledBest: 0,
  measuredModelled: 0,
  trapped: 0,
  downtime: 0,
  held: 0,
  stowed: 0,
  soiling: 0,
  fixedTwin: 0,
  sunTwin: 0,
});

function addPeriod(s: Sums, category: AvailabilityCategory | null, durationMs: number, actualKwh: number, lostKwh: number): void {
  const key = category ?? 'up';
  const p = s.periods.get(key);
  if (p) {
    p.durationMs += durationMs;
    p.actualKwh += actualKwh;
    p.lostKwh += lostKwh;
  } else s.periods.set(key, { durationMs, daylight: true, downCategory: category, actualKwh, lostKwh });
}

/** Adds b's sums into a (written out field by field: this runs for every unit and bucket of a month). */
function addInto(a: Sums, b: Sums): void {
  a.energyKwh += b.energyKwh;
  a.p0HiKwh += b.p0HiKwh;
  a.minutes += b.minutes;
  a.expectedMinutes += b.expectedMinutes;
  a.prStcNum += b.prStcNum;
  a.prStcDen += b.prStcDen;
  a.daylightBuckets += b.daylightBuckets;
  a.modelledDaylightBuckets += b.modelledDaylightBuckets;
  a.modelledBest += b.modelledBest;
  a.measuredModelled += b.measuredModelled;
  a.trapped += b.trapped;
  a.downtime += b.downtime;
  a.held += b.held;
  a.stowed += b.stowed;
  a.soiling += b.soiling;
  a.fixedTwin += b.fixedTwin;
  a.sunTwin += b.sunTwin;
  for (const p of b.periods.values()) addPeriod(a, p.downCategory, p.durationMs, p.actualKwh, p.lostKwh);
}

function clearSums(s: Sums): void {
  s.energyKwh = s.p0HiKwh = s.minutes = s.expectedMinutes = s.prStcNum = s.prStcDen = 0;
  s.daylightBuckets = s.modelledDaylightBuckets = s.modelledBest = s.measuredModelled = 0;
  s.trapped = s.downtime = s.held = s.stowed = s.soiling = s.fixedTwin = s.sunTwin = 0;
}

const round = (x: number, d: number) => Math.round(x * 10 ** d) / 10 ** d;
const gainPct = (measured: number, twin: number) => (twin > 0 ? round((measured / twin - 1) * 100, 2) : null);
const median = (xs: number[]) => {
  if (!xs.length) return null;
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
};
const covers = (fromMs: number, toMs: number | null, atMs: number) => fromMs <= atMs && (toMs === null || atMs < toMs);

function availabilityView(periods: Map<AvailabilityCategory | 'up', AvailabilityPeriod>): StatementAvailability {
  const a = availabilityOf([...periods.values()]);
  const r4 = (x: number | null) => (x === null ? null : round(x, 4));
  return {
    timeRaw: r4(a.timeRaw),
    timeContractual: r4(a.timeContractual),
    energyRaw: r4(a.energyRaw),
    energyContractual: r4(a.energyContractual),
    daylightH: round(a.usefulMs / 3_600_000, 2),
    downH: round(a.downMs / 3_600_000, 2),
    excludedH: round(a.excludedMs / 3_600_000, 2),
    lostKwh: round(a.lostKwh, 3),
    excludedLostKwh: round(a.excludedLostKwh, 3),
  };
}

function figuresOf(s: Sums, p0Kwp: number): StatementFigures {
  const hi = p0Kwp > 0 ? s.p0HiKwh / p0Kwp : 0;
  const yf = p0Kwp > 0 ? s.energyKwh / p0Kwp : null;
  const modelled = s.modelledBest;
  const named = s.trapped + s.downtime + s.held + s.stowed + s.soiling;
  const r3 = (x: number) => round(x, 3);
  return {
    energyKwh: r3(s.energyKwh),
    p0Kwp: r3(p0Kwp),
    yfH: yf === null ? null : round(yf, 3),
    hiKwhM2: r3(hi),
    yrH: r3(hi),
    pr: yf !== null && hi > 0 ? round(yf / hi, 4) : null,
    prStc: s.prStcDen > 0 ? round(s.prStcNum / s.prStcDen, 4) : null,
    completeness: s.expectedMinutes > 0 ? round(s.minutes / s.expectedMinutes, 4) : 0,
    modelledShare: s.daylightBuckets > 0 ? round(s.modelledDaylightBuckets / s.daylightBuckets, 4) : 0,
    availability: availabilityView(s.periods),
    losses: {
      modelledBestKwh: r3(modelled),
      measuredKwh: r3(s.measuredModelled),
      trappedKwh: r3(s.trapped),
      downtimeKwh: r3(s.downtime),
      heldKwh: r3(s.held),
      stowedKwh: r3(s.stowed),
      soilingKwh: r3(s.soiling),
      residualKwh: r3(modelled - s.measuredModelled - named),
    },
    gains: {
      measuredKwh: r3(s.measuredModelled),
      fixedTwinKwh: r3(s.fixedTwin),
      sunTwinKwh: r3(s.sunTwin),
      gainOverFixedPct: gainPct(s.measuredModelled, s.fixedTwin),
      gainOverSunPct: gainPct(s.measuredModelled, s.sunTwin),
    },
  };
}

interface DownPiece {
  minutes: number;
  category: AvailabilityCategory;
  source: ExclusionSource;
  ticketId: number | null;
  lostKwh: number;
}

/**
 * The downtime pieces of a daylight bucket, in order comms, wind stow, hold, fault, stall (`stalledMin` > 0), each with
 * its "at best" loss (`kBestKwhPerMin` × minutes). A ticket covering the bucket's midpoint gives every piece its category.
 */
function downPieces(
  tickets: readonly StatementTicket[],
  midMs: number,
  kBestKwhPerMin: number,
  minutes: number,
  stowedMin: number,
  heldMin: number,
  faultMin: number,
  stalledMin: number,
): DownPiece[] {
  let ticket: StatementTicket | undefined;
  for (const t of tickets)
    if (covers(t.fromMs, t.toMs, midMs)) {
      ticket = t;
      break;
    }
  const out: DownPiece[] = [];
  const add = (mins: number, category: AvailabilityCategory, source: ExclusionSource) => {
    if (mins <= 0) return;
    out.push(
      ticket
        ? { minutes: mins, category: ticket.category, source: 'ticket', ticketId: ticket.id, lostKwh: kBestKwhPerMin * mins }
        : { minutes: mins, category, source, ticketId: null, lostKwh: kBestKwhPerMin * mins },
    );
  };
  add(15 - minutes, 'forced-outage', 'comms');
  add(stowedMin, 'out-of-environmental-specification', 'wind-stow');
  add(heldMin, 'scheduled-maintenance', 'hold');
  add(faultMin, 'forced-outage', 'fault');
  add(stalledMin, 'forced-outage', 'stall');
  return out;
}

/**
 * Solar zenith from the textbook approximations (Cooper 1969 declination, Spencer 1971 equation of time; Duffie &
 * Beckman eqs 1.6.1a, 1.5.3, cos θz = cos φ cos δ cos ω + sin φ sin δ), within about a degree: enough to tell daylight
 * for buckets no unit reported, at a fraction of the full SPA's cost (a month is 2,976 buckets).
 */
export function zenithEstimateDeg(latitudeDeg: number, longitudeDeg: number, utcMs: number): number {
  const d = new Date(utcMs);
  const dayOfYear = Math.floor((utcMs - Date.UTC(d.getUTCFullYear(), 0, 1)) / 86_400_000) + 1;
  const solarMin = (((utcMs % 86_400_000) + 86_400_000) % 86_400_000) / 60_000 + 4 * longitudeDeg + equationOfTimeSpencerMin(dayOfYear);
  const omega = ((solarMin / 60 - 12) * 15 * Math.PI) / 180;
  const phi = (latitudeDeg * Math.PI) / 180;
  const delta = (declinationCooperDeg(dayOfYear) * Math.PI) / 180;
  const c = Math.cos(phi) * Math.cos(delta) * Math.cos(omega) + Math.sin(phi) * Math.sin(delta);
  return (Math.acos(Math.max(-1, Math.min(1, c))) * 180) / Math.PI;
}

const NO_PIECES: DownPiece[] = [];
const nz = (x: number) => (x === x ? x : 0); // NaN (NULL) → 0

/** Computes a site's statement figures for one local month (the month so far when `untilMs` falls inside it). */
export function computeStatement(input: StatementInput): StatementResult {
  const { month, units } = input;
  const c = input.columns;
  const from = month.fromMs;
  if (c.fromMs !== from) throw new RangeError(`columns start at ${c.fromMs}, the month at ${from}`);
  const until = Math.min(month.toMs, Math.floor(input.untilMs / QUARTER_MS) * QUARTER_MS);
  const nB = Math.min(c.buckets, Math.max(0, Math.ceil((until - from) / QUARTER_MS)));
  const nAll = c.buckets;
  const slotOfId = new Map(c.unitIds.map((id, slot) => [id, slot]));
  /** Each unit's first element in the columns, or −1 when the columns do not hold it (no rows). */
  const baseOf = units.map((u) => {
    const slot = slotOfId.get(u.id);
    return slot === undefined ? -1 : slot * nAll;
  });
  const { minutes: cMin, poaAvgWm2: cPoa, energyWh: cE, moduleTempC: cT, settledMin: cSettled } = c;
  const { stowedMin: cStowed, heldMin: cHeld, faultMin: cFault } = c;
  const { modelUnitWm2: cMU, modelBestWm2: cMB, modelFixedWm2: cMF, modelSunWm2: cMS } = c;

  // Site-level per bucket: daylight, and a reference irradiance for units without a model.
  const daylight = new Uint8Array(nB);
  const refWm2 = new Float64Array(nB);
  // The site's modelled values of a bucket (NaN without), which a unit with no row that bucket borrows.
  const siteFixed = new Float64Array(nB).fill(NaN);
  const siteSun = new Float64Array(nB).fill(NaN);
  const siteBest = new Float64Array(nB).fill(NaN);
  for (let i = 0; i < nB; i++) {
    let best = -1;
    let poa = -1;
    let sB = NaN;
    let sF = NaN;
    let sS = NaN;
    for (const base of baseOf) {
      if (base < 0) continue;
      const ix = base + i;
      const mins = cMin[ix]!;
      if (mins !== mins) continue; // no row
      const mB = cMB[ix]!;
      if (mB === mB) {
        best = Math.max(best, mB);
        const mF = cMF[ix]!;
        const mS = cMS[ix]!;
        if (mF === mF && mS === mS) {
          sB = Math.max(mB, sB === sB ? sB : 0);
          sF = Math.max(mF, sF === sF ? sF : 0);
          sS = Math.max(mS, sS === sS ? sS : 0);
        }
      }
      if (mins > 0) poa = Math.max(poa, cPoa[ix]!);
    }
    siteBest[i] = sB;
    siteFixed[i] = sF;
    siteSun[i] = sS;
    let g = best >= 0 ? best : poa;
    if (g < 0) {
      const z = zenithEstimateDeg(input.site.latitudeDeg, input.site.longitudeDeg, from + i * QUARTER_MS + QUARTER_MS / 2);
      g = z < 90 ? clearSkyGhiHaurwitz(z) : 0;
    }
    refWm2[i] = g;
    daylight[i] = g >= DAYLIGHT_THRESHOLD_WM2 ? 1 : 0;
  }
  const dayOf = new Int32Array(nB);
  for (let i = 0, d = 0; i < nB; i++) {
    const b = from + i * QUARTER_MS;
    while (d < month.days.length - 1 && b >= month.days[d]!.toMs) d++;
    dayOf[i] = d;
  }

  // First pass: each unit's PR, for the site's median PR of the month.
  const prs: number[] = [];
  for (const [n, u] of units.entries()) {
    const base = baseOf[n]!;
    if (base < 0) continue;
    let e = 0;
    let h = 0;
    for (let i = 0; i < nB; i++) {
      const mins = cMin[base + i]!;
      if (mins !== mins) continue;
      e += cE[base + i]! / 1000;
      h += (cPoa[base + i]! * mins) / 60 / 1000;
    }
    const p0 = u.ratedPowerWp / 1000;
    if (h > 0 && p0 > 0) prs.push(e / p0 / h);
  }
  const medianPr = median(prs);
  const prMed = medianPr ?? 0;

  const siteSums = emptySums();
  const daySums = month.days.map(() => emptySums());
  const unitOut: StatementUnit[] = [];
  const exclusions: StatementExclusion[] = [];
  // A unit's sums of its current day: each bucket adds here once; a finished day folds into the unit's and the day's.
  const cur = emptySums();

  for (const [n, u] of units.entries()) {
    const base = baseOf[n]!;
    const p0 = u.ratedPowerWp / 1000;
    const sums = emptySums();
    const unitTickets = input.tickets.filter(
      (t) => (t.unitId === null || t.unitId === u.id) && !IN_SERVICE_CATEGORIES.includes(t.category),
    );
    const stalls = input.alarms.filter((a) => a.unitId === u.id && a.kind === 'stall');
    const soilings = input.alarms.filter((a) => a.unitId === u.id && a.kind === 'soiling');
    let open: StatementExclusion | null = null;
    let openEndMs = 0;
    const flush = () => {
      if (open) exclusions.push({ ...open, to: isoWithOffset(openEndMs, input.site.timeZone), lostKwh: round(open.lostKwh, 3) });
      open = null;
    };

    /** kWh per (W/m² · minute) at the site's median PR. */
    const kPr = (prMed * p0) / 60 / 1000;
    clearSums(cur);
    cur.periods.clear();
    let curDay = nB > 0 ? dayOf[0]! : 0;
    for (let i = 0; i < nB; i++) {
      if (dayOf[i] !== curDay) {
        addInto(sums, cur);
        addInto(daySums[curDay]!, cur);
        clearSums(cur);
        cur.periods.clear();
        curDay = dayOf[i]!;
      }
      const b = from + i * QUARTER_MS;
      const mid = b + QUARTER_MS / 2;
      const ix = base < 0 ? -1 : base + i;
      const reported = ix >= 0 ? cMin[ix]! : NaN;
      const hasRow = reported === reported;
      const minutes = hasRow ? Math.min(15, reported) : 0;
      const e = hasRow ? cE[ix]! / 1000 : 0;
      const hi = hasRow ? (cPoa[ix]! * minutes) / 60 / 1000 : 0;
      cur.energyKwh += e;
      cur.p0HiKwh += p0 * hi;
      cur.minutes += minutes;
      cur.expectedMinutes += 15;
      if (hasRow && hi > 0) {
        const tC = cT[ix]!;
        if (tC === tC) {
          cur.prStcNum += e;
          cur.prStcDen += p0 * temperatureFactor(input.gammaPerK, tC) * hi;
        }
      }
      const mU = hasRow ? cMU[ix]! : NaN;
      const mB = hasRow ? cMB[ix]! : NaN;
      const mF = hasRow ? cMF[ix]! : NaN;
      const mS = hasRow ? cMS[ix]! : NaN;
      const rowModelled = hasRow && mU === mU && mB === mB && mF === mF && mS === mS;
      // A bucket without a row borrows the site's modelled values (its peers'), so downtime without data is counted.
      const borrowed = !hasRow && siteBest[i] === siteBest[i];
      const stowed = hasRow ? nz(cStowed[ix]!) : 0;
      const held = hasRow ? nz(cHeld[ix]!) : 0;
      const fault = hasRow ? nz(cFault[ix]!) : 0;
      const producing = Math.max(0, minutes - stowed - held - fault);
      let stalled = false;
      if (producing > 0) for (const a of stalls) if (covers(a.fromMs, a.toMs, mid)) stalled = true;
      const gBest = rowModelled ? mB : borrowed ? siteBest[i]! : refWm2[i]!;
      /** kWh per minute at the best orientation, at the site's median PR. */
      const kBest = kPr * gBest;

      if (borrowed) {
        cur.modelledBest += kBest * 15;
        cur.downtime += kBest * 15;
        cur.fixedTwin += kPr * siteFixed[i]! * 15;
        cur.sunTwin += kPr * siteSun[i]! * 15;
      } else if (rowModelled) {
        const ratioOk = mU > 1 && e > 0;
        const bestProd = ratioOk ? (e * mB) / mU : kBest * producing;
        const gap = Math.max(0, bestProd - e);
        cur.modelledBest += bestProd + kBest * (15 - producing);
        cur.measuredModelled += e;
        const settledMostly = nz(cSettled[ix]!) >= producing / 2 && producing > 0;
        if (stalled) cur.downtime += gap;
        else if (settledMostly && mU < TRAP_RATIO * mB) cur.trapped += gap;
        cur.downtime += kBest * (15 - minutes + fault);
        cur.held += kBest * held;
        cur.stowed += kBest * stowed;
        if (soilings.length)
          for (const a of soilings)
            if (covers(a.fromMs, a.toMs, mid)) {
              cur.soiling += Math.max(0, prMed * p0 * hi - e);
              break;
            }
        const down = kPr * (15 - producing);
        cur.fixedTwin += (ratioOk ? (e * mF) / mU : kPr * mF * producing) + down * mF;
        cur.sunTwin += (ratioOk ? (e * mS) / mU : kPr * mS * producing) + down * mS;
      }

      if (daylight[i] === 1) {
        cur.daylightBuckets += 1;
        if (rowModelled || borrowed) cur.modelledDaylightBuckets += 1;
        const anyDown = minutes < 15 || stowed > 0 || held > 0 || fault > 0 || stalled;
        const pieces = anyDown ? downPieces(unitTickets, mid, kBest, minutes, stowed, held, fault, stalled ? producing : 0) : NO_PIECES;
        if (stalled) pieces[pieces.length - 1]!.lostKwh = Math.max(0, kBest * producing - e);
        for (const p of pieces) addPeriod(cur, p.category, p.minutes * 60_000, 0, p.lostKwh);
        addPeriod(cur, null, (stalled ? 0 : producing) * 60_000, e, 0);
        // The exclusion list: one interval per run of buckets with the same category, source and ticket.
        let main: DownPiece | undefined;
        for (const p of pieces) if (!main || p.minutes > main.minutes) main = p;
        if (!main) flush();
        else {
          const same =
            open && open.category === main.category && open.source === main.source && open.ticketId === main.ticketId && openEndMs === b;
          if (!same) {
            flush();
            open = {
              serial: u.serial,
              from: isoWithOffset(b, input.site.timeZone),
              to: '',
              minutes: 0,
              category: main.category,
              source: main.source,
              ticketId: main.ticketId,
              excused: EXCUSED_CATEGORIES.includes(main.category),
              lostKwh: 0,
            };
          }
          for (const p of pieces) {
            open!.minutes += p.minutes;
            open!.lostKwh += p.lostKwh;
          }
          openEndMs = b + QUARTER_MS;
        }
      } else flush();
    }
    if (nB > 0) {
      addInto(sums, cur);
      addInto(daySums[curDay]!, cur);
    }
    flush();
    sums.p0Kwp = p0;
    addInto(siteSums, sums);
    unitOut.push({ unitId: u.id, serial: u.serial, ...figuresOf(sums, p0) });
  }
  const p0Site = units.reduce((s, u) => s + u.ratedPowerWp / 1000, 0);
  const days: StatementDay[] = month.days.map((d, i) => {
    const s = daySums[i]!;
    const f = figuresOf(s, p0Site);
    return {
      date: d.date,
      hours: d.hours,
      energyKwh: f.energyKwh,
      hiKwhM2: f.hiKwhM2,
      yfH: d.fromMs < until ? f.yfH : null,
      pr: f.pr,
      completeness: f.completeness,
      availabilityTimeRaw: f.availability.timeRaw,
      gainOverFixedPct: f.gains.gainOverFixedPct,
      gainOverSunPct: f.gains.gainOverSunPct,
    };
  });
  return { site: figuresOf(siteSums, p0Site), units: unitOut, days, exclusions, medianPr };
}
