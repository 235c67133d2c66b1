import type {
  MonthlyStatement,
  StatementLockInfo,
  StatementMonthList,
  StatementTrend,
  StatementVersionSummary,
} from '../../shared/contracts/statements';
import { MODULE_POWER_TEMP_COEFF_PER_K } from '../../shared/contracts/pv-module';
import { csvLine } from '../../shared/csv/csv-field';
import {
  isoWithOffset,
  localMonth,
  monthOfInstant,
  nextMonthOf,
  parseMonth,
  previousMonthOf,
  type LocalMonth,
} from '../../shared/pv-performance';
import type { StatementRepository } from '../data/statement-repository';
import type { StatementLockRepository, StoredStatement } from '../data/statement-lock-repository';
import { badRequest, notFound } from '../errors/app-error';
import type { AdminService } from './admin-service';
import type { Caller } from './caller';
import { computeStatement, DAYLIGHT_THRESHOLD_WM2 } from './statement-figures';
import type { TicketService } from './ticket-service';

export const STATEMENT_MODEL = [
  'Modelled irradiance: the landscape engine over the site survey (horizon, facades, lamps) with the mean weather-station reading of each 15-minute bucket, else the Ineichen–Perez clear sky, at the bucket midpoint.',
  'Best: the brightest orientation each unit can reach within its travel (1° search). Fixed-tilt twin: tilt = site latitude, facing the equator. Sun-following twin: pointing at the sun within the same travel.',
  'Twin and best energy per 15 minutes = measured energy × modelled irradiance of the twin (or best) ÷ modelled irradiance at the unit’s reported orientation, so model bias cancels; where the unit produced nothing, the site’s median PR of the month × P0 × modelled irradiance × time.',
  'Losses are counted where buckets are modelled; the residual is what the named parts do not explain (soiling estimate, model error, partial shade, clipping).',
];

const versionOf = (v: Omit<StoredStatement, 'content'>): StatementVersionSummary => ({
  version: v.version,
  state: v.state,
  lockedAt: v.lockedAt.toISOString(),
  lockedBy: v.lockedBy === null ? null : (v.lockedByName ?? `person ${v.lockedBy}`),
  reason: v.reason,
  checksum: v.checksum,
});

/**
 * Owners' monthly statements of a site: the figures, the daily table, exclusions and tickets, computed from the stored
 * rollups while a month is open and served as stored once it is locked (statement-lock-service.ts). Owners reach their
 * own sites only (AdminService.getSite answers 404 elsewhere).
 */
export class StatementService {
  constructor(
    private readonly repo: StatementRepository,
    private readonly admin: Pick<AdminService, 'getSite'>,
    private readonly tickets: Pick<TicketService, 'kpis'>,
    private readonly now: () => number = Date.now,
    private readonly locks?: StatementLockRepository,
  ) {}

  /** Months with data (and locked months), newest first. */
  async months(c: Caller, siteId: number): Promise<StatementMonthList> {
    const site = await this.admin.getSite(c, siteId);
    const span = await this.repo.span(site.id);
    const current = monthOfInstant(this.now(), site.timeZone);
    const locked = new Map((await this.locks?.lockedMonths(site.id))?.map((l) => [l.month, l]) ?? []);
    const months: StatementMonthList['months'] = [];
    if (span) {
      const last = monthOfInstant(span.lastMs, site.timeZone);
      for (let m = monthOfInstant(span.firstMs, site.timeZone); m <= last && months.length < 240; m = nextMonthOf(m)) {
        const l = locked.get(m);
        months.push({ month: m, partial: m >= current, locked: !!l, version: l?.version ?? null, restatementSuggested: !!l?.suggested });
      }
    }
    return { siteId: site.id, siteName: site.name, timeZone: site.timeZone, months: months.reverse() };
  }

  /** The current month so far and the twelve before it (oldest first), from each month's statement. */
  async trend(c: Caller, siteId: number): Promise<StatementTrend> {
    const site = await this.admin.getSite(c, siteId);
    let m = monthOfInstant(this.now(), site.timeZone);
    const wanted: string[] = [];
    for (let i = 0; i < 13; i++, m = previousMonthOf(m)) wanted.unshift(m);
    const months: StatementTrend['months'] = [];
    const span = await this.repo.span(site.id);
    const first = span ? monthOfInstant(span.firstMs, site.timeZone) : null;
    for (const month of wanted) {
      if (first === null || month < first) {
        months.push({
          month,
          partial: month === wanted[wanted.length - 1],
          hasData: false,
          energyKwh: 0,
          yfH: null,
          pr: null,
          availabilityTimeContractual: null,
          availabilityEnergyContractual: null,
          gainOverFixedPct: null,
          gainOverSunPct: null,
          completeness: 0,
        });
        continue;
      }
      const s = await this.statement(c, site.id, month);
      months.push({
        month,
        partial: s.partial,
        hasData: true,
        energyKwh: s.site.energyKwh,
        yfH: s.site.yfH,
        pr: s.site.pr,
        availabilityTimeContractual: s.site.availability.timeContractual,
        availabilityEnergyContractual: s.site.availability.energyContractual,
        gainOverFixedPct: s.site.gains.gainOverFixedPct,
        gainOverSunPct: s.site.gains.gainOverSunPct,
        completeness: s.site.completeness,
      });
    }
    return { siteId: site.id, siteName: site.name, timeZone: site.timeZone, months };
  }

  /**
   * The statement of a month: once locked, the stored version in force (or `version`) with its lock; while open,
   * computed from the stored rollups (lock null).
   */
  async statement(c: Caller, siteId: number, month: string, version: number | null = null): Promise<MonthlyStatement> {
    const site = await this.admin.getSite(c, siteId);
    try {
      parseMonth(month);
    } catch (e) {
      throw badRequest('The month is not valid.', { month: (e as Error).message });
    }
    const stored = await this.locks?.get(site.id, month, version);
    if (stored) return this.served(stored);
    if (version !== null) throw notFound(`Version ${version} of the statement for ${month}`);
    return this.compute(c, siteId, month);
  }

  /** A stored version as served: its content with the lock and every version of the month. */
  async served(stored: StoredStatement): Promise<MonthlyStatement> {
    const versions = (await this.locks!.versions(stored.siteId, stored.month)).map(versionOf);
    const lock: StatementLockInfo = {
      ...versionOf(stored),
      restatementSuggestedAt: stored.restatementSuggestedAt?.toISOString() ?? null,
      versions,
    };
    return { ...(JSON.parse(stored.content) as Omit<MonthlyStatement, 'lock'>), lock };
  }

  /** The statement computed now from the stored rollups, tickets and alarms (what a lock stores); lock null. */
  async compute(c: Caller, siteId: number, month: string): Promise<MonthlyStatement> {
    const site = await this.admin.getSite(c, siteId);
    let lm: LocalMonth;
    try {
      parseMonth(month);
      lm = localMonth(month, site.timeZone);
    } catch (e) {
      throw badRequest('The month is not valid.', { month: (e as Error).message });
    }
    const nowMs = this.now();
    if (lm.fromMs > nowMs) throw badRequest('The month has not begun.', { month: `${month} starts after today in ${site.timeZone}.` });
    const units = await this.repo.units(site.id);
    const [columns, tickets, alarms, kpis] = await Promise.all([
      this.repo.quarterColumns(
        units.map((u) => u.id),
        lm.fromMs,
        lm.toMs,
      ),
      this.repo.tickets(site.id, lm.fromMs, lm.toMs),
      this.repo.alarms(site.id, lm.fromMs, lm.toMs),
      this.tickets.kpis(c, site.id, month),
    ]);
    const r = computeStatement({
      site: { latitudeDeg: site.latitudeDeg, longitudeDeg: site.longitudeDeg, elevationM: site.elevationM, timeZone: site.timeZone },
      month: lm,
      untilMs: nowMs,
      units,
      columns,
      tickets,
      alarms,
      gammaPerK: MODULE_POWER_TEMP_COEFF_PER_K,
    });
    const inMonth = (ms: number | null) => ms !== null && ms >= lm.fromMs && ms < lm.toMs;
    const notes: string[] = [];
    if (r.site.modelledShare < 1)
      notes.push(
        `Modelled values cover ${Math.round(r.site.modelledShare * 1000) / 10} % of the daylight buckets; losses and gains are counted over those buckets only.`,
      );
    if (r.site.completeness < 1)
      notes.push(
        `Reports cover ${Math.round(r.site.completeness * 1000) / 10} % of the expected minutes; missing data is left empty, never filled in.`,
      );
    if (r.medianPr === null) notes.push('No unit has a PR this month, so downtime and twins get no energy where units produced nothing.');
    return {
      siteId: site.id,
      siteName: site.name,
      ownerName: site.ownerName,
      month,
      timeZone: site.timeZone,
      from: isoWithOffset(lm.fromMs, site.timeZone),
      to: isoWithOffset(lm.toMs, site.timeZone),
      hours: lm.hours,
      partial: nowMs < lm.toMs,
      generatedAt: new Date(nowMs).toISOString(),
      site: r.site,
      units: r.units,
      days: r.days,
      exclusions: r.exclusions,
      tickets: {
        opened: kpis.opened,
        resolved: kpis.resolved,
        closed: tickets.filter((t) => inMonth(t.closedMs)).length,
        slaCompliancePct: kpis.slaCompliancePct,
        mttrH: kpis.mttrH,
      },
      assumptions: {
        energy: 'DC energy as measured by each unit (not the revenue meter).',
        gammaPctPerK: MODULE_POWER_TEMP_COEFF_PER_K * 100,
        daylightThresholdWm2: DAYLIGHT_THRESHOLD_WM2,
        model: STATEMENT_MODEL,
        notes,
      },
      lock: null,
    };
  }
}

/** CSV header: one column per quantity with its unit. */
export const STATEMENT_CSV_COLUMNS = [
  'site_id',
  'scope',
  'serial',
  'period_start_local',
  'period_end_local',
  'energy_dc_kWh',
  'rated_power_kWp',
  'final_yield_kWh_kWp',
  'in_plane_irradiation_kWh_m2',
  'reference_yield_h',
  'performance_ratio',
  'performance_ratio_temp_corrected',
  'data_completeness_pct',
  'modelled_share_pct',
  'availability_time_raw_pct',
  'availability_time_contractual_pct',
  'availability_energy_raw_pct',
  'availability_energy_contractual_pct',
  'modelled_best_kWh',
  'loss_trapped_kWh',
  'loss_downtime_kWh',
  'loss_held_kWh',
  'loss_stowed_kWh',
  'loss_soiling_estimate_kWh',
  'loss_residual_kWh',
  'fixed_twin_kWh',
  'sun_following_twin_kWh',
  'gain_over_fixed_pct',
  'gain_over_sun_following_pct',
] as const;

/**
 * A statement as CSV (RFC 4180 through shared/csv): the site's month, each unit's month, then the site's days (long
 * format, `scope` = site | unit | day). Times ISO 8601 with the site's offset; empty = missing; percentages in %.
 */
export function statementCsv(s: MonthlyStatement): string {
  const pct = (x: number | null) => (x === null ? null : Math.round(x * 100_000) / 1000);
  const figures = (scope: string, serial: string | null, from: string, to: string, f: MonthlyStatement['site']) => [
    s.siteId,
    scope,
    serial,
    from,
    to,
    f.energyKwh,
    f.p0Kwp,
    f.yfH,
    f.hiKwhM2,
    f.yrH,
    f.pr,
    f.prStc,
    pct(f.completeness),
    pct(f.modelledShare),
    pct(f.availability.timeRaw),
    pct(f.availability.timeContractual),
    pct(f.availability.energyRaw),
    pct(f.availability.energyContractual),
    f.losses.modelledBestKwh,
    f.losses.trappedKwh,
    f.losses.downtimeKwh,
    f.losses.heldKwh,
    f.losses.stowedKwh,
    f.losses.soilingKwh,
    f.losses.residualKwh,
    f.gains.fixedTwinKwh,
    f.gains.sunTwinKwh,
    f.gains.gainOverFixedPct,
    f.gains.gainOverSunPct,
  ];
  let out = csvLine(STATEMENT_CSV_COLUMNS);
  out += csvLine(figures('site', null, s.from, s.to, s.site));
  for (const u of s.units) out += csvLine(figures('unit', u.serial, s.from, s.to, u));
  const lm = localMonth(s.month, s.timeZone);
  for (const [i, d] of s.days.entries()) {
    const day = lm.days[i]!;
    const row: (string | number | null)[] = new Array(STATEMENT_CSV_COLUMNS.length).fill(null);
    const set = (col: (typeof STATEMENT_CSV_COLUMNS)[number], v: string | number | null) => (row[STATEMENT_CSV_COLUMNS.indexOf(col)] = v);
    set('site_id', s.siteId);
    set('scope', 'day');
    set('period_start_local', isoWithOffset(day.fromMs, s.timeZone));
    set('period_end_local', isoWithOffset(day.toMs, s.timeZone));
    set('energy_dc_kWh', d.energyKwh);
    set('rated_power_kWp', s.site.p0Kwp);
    set('final_yield_kWh_kWp', d.yfH);
    set('in_plane_irradiation_kWh_m2', d.hiKwhM2);
    set('reference_yield_h', d.hiKwhM2);
    set('performance_ratio', d.pr);
    set('data_completeness_pct', pct(d.completeness));
    set('availability_time_raw_pct', pct(d.availabilityTimeRaw));
    set('gain_over_fixed_pct', d.gainOverFixedPct);
    set('gain_over_sun_following_pct', d.gainOverSunPct);
    out += csvLine(row);
  }
  return out;
}
