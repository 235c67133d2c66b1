import type { Logger } from 'pino';
import type { Site } from '../../shared/contracts/api';
import type {
  ApplyDetectorTiltResult,
  ApplyDetectorTiltUnit,
  DetectorTiltDay,
  DetectorTiltRecommendation,
} from '../../shared/contracts/detector-tilt';
import {
  dayDetectorTilt,
  mergeDayDetectorTilts,
  recommendDetectorTilt,
  worstDay,
  type DayDetectorTilt,
  type DaySkies,
} from '../../shared/landscape/detector-tilt';
import { solarPosition } from '../../shared/solar-position';
import { WIRE_RANGES } from '../../shared/contracts/wire-format';
import { AppError } from '../errors/app-error';
import type { AdminService } from './admin-service';
import type { AuditService } from './audit-service';
import type { Caller } from './caller';
import type { CommandService } from './command-service';
import type { HealthSettingsService } from './health-settings-service';
import { localDate, utcWindowOfLocalDate } from './local-time';
import type { SiteModelService } from './site-model-service';

const HOUR_MS = 3_600_000;
/** The coarse pass: every candidate day hourly on a 5° landscape (about 30 ms a sky); the worst day again every 30 min at 3°. */
const COARSE = { stepDeg: 5, everyMs: HOUR_MS };
const FINE = { stepDeg: 3, everyMs: HOUR_MS / 2 };
/** The single-peak search goes as far as units take (WIRE_RANGES.detectorTiltDeg), not the engine's default 30°. */
const MAX_TILT_DEG = WIRE_RANGES.detectorTiltDeg[1];
/** The 21st of each month: the solstices and equinoxes and the declinations between them, at most ~4° apart. */
const CANDIDATE_DAY = 21;

interface YearJudged {
  days: DayDetectorTilt[];
  worst: DayDetectorTilt | undefined;
}

export interface RecommendRequest {
  year: number;
  marginDeg: number;
}

/**
 * The detector tilt a site needs over a year, and sending it to every unit of the site. The year is judged on the
 * clear-sky model of the site's survey (no weather: a clear day is when facades reflect the sun and make traps), on the
 * 21st of each month, hourly while the sun is up and the modelled best reaches the site's trap threshold (the health
 * setting `trapMinBestWm2`: in weaker light traps are not judged, and dawn's few-W/m² bumps are not worth a tilt); the worst of those days is judged again every 30 minutes on a finer
 * grid, and the recommendation is its single-peak detector tilt plus a margin (shared/landscape/detector-tilt.ts).
 * The work is CPU-bound (a few seconds a site), so results are cached per site, survey, year and margin.
 */
export class DetectorTiltService {
  private readonly cache = new Map<string, Promise<YearJudged>>();

  constructor(
    private readonly admin: AdminService,
    private readonly model: SiteModelService,
    private readonly commands: () => CommandService,
    private readonly audit: AuditService,
    private readonly settings: HealthSettingsService,
    private readonly log: Logger,
  ) {}

  async recommend(c: Caller, siteId: number, req: RecommendRequest): Promise<DetectorTiltRecommendation> {
    const site = await this.admin.getSite(c, siteId);
    const survey = await this.model.survey(site.id);
    const minBestWm2 = this.settings.forSite(site.id).trapMinBestWm2;
    const key = JSON.stringify([
      site.id,
      site.latitudeDeg,
      site.longitudeDeg,
      site.elevationM,
      site.timeZone,
      req.year,
      minBestWm2,
      survey,
    ]);
    let p = this.cache.get(key);
    if (!p) {
      p = this.judgeYear(site, req.year, minBestWm2);
      p.catch(() => this.cache.delete(key));
      this.cache.set(key, p);
      if (this.cache.size > 64) this.cache.delete(this.cache.keys().next().value!);
    }
    const units = (await this.admin.listUnits(c, site.id)).map((u) => ({
      id: u.id,
      serial: u.serial,
      detectorTiltDeg: u.detectorTiltDeg,
      disabled: u.disabled,
    }));
    const { days, worst } = await p;
    const rec = recommendDetectorTilt(worst, req.marginDeg);
    return {
      siteId: site.id,
      year: req.year,
      marginDeg: req.marginDeg,
      minBestWm2,
      maxDetectorTiltDeg: MAX_TILT_DEG,
      basis:
        `Clear-sky model of the site survey (no weather) on the ${CANDIDATE_DAY}st of each month of ${req.year}, hourly while the sun is up ` +
        `and the modelled best reaches ${minBestWm2} W/m² (below it traps are not judged) on a ${COARSE.stepDeg}° landscape grid; ` +
        `the worst day again every 30 minutes on a ${FINE.stepDeg}° grid, plus a margin of ${req.marginDeg}°.`,
      days: days.map(dayView),
      worstDay: worst
        ? { ...dayView(worst), worstAt: worst.worstAtMs === null ? null : new Date(worst.worstAtMs).toISOString(), stepDeg: FINE.stepDeg }
        : null,
      recommendedDetectorTiltDeg: rec.detectorTiltDeg,
      capped: rec.capped,
      units,
    };
  }

  /**
   * Sends `configure { detectorTiltDeg }` to every enabled unit of the site, one command each through the command
   * service (each audited there, refusals included), and records the site-wide request. Answers with each unit's command
   * as stored when it was sent; the units' answers follow on the live socket and in each unit's command history.
   */
  async apply(c: Caller, siteId: number, detectorTiltDeg: number): Promise<ApplyDetectorTiltResult> {
    const site = await this.admin.getSite(c, siteId);
    const units = await this.admin.listUnits(c, site.id);
    const out: ApplyDetectorTiltUnit[] = [];
    for (const u of units) {
      if (u.disabled) {
        out.push({ unitId: u.id, serial: u.serial, commandId: null, status: 'skipped', reason: 'The unit is disabled: nothing was sent.' });
        continue;
      }
      try {
        const cmd = await this.commands().issue(c, u.id, { kind: 'configure', config: { detectorTiltDeg }, confirm: true });
        out.push({ unitId: u.id, serial: u.serial, commandId: cmd.id, status: cmd.status, reason: cmd.reason });
      } catch (err) {
        if (!(err instanceof AppError)) throw err;
        out.push({ unitId: u.id, serial: u.serial, commandId: null, status: 'refused', reason: err.message });
      }
    }
    await this.audit.record(c, 'detector-tilt-apply', `site:${site.id}`, {
      detectorTiltDeg,
      sent: out.filter((u) => u.commandId).map((u) => u.serial),
      notSent: out.filter((u) => !u.commandId).map((u) => u.serial),
    });
    return { siteId: site.id, detectorTiltDeg, units: out };
  }

  /** The candidate days of a year (coarse pass) and the worst of them judged again finely (undefined when all are dark). */
  private async judgeYear(site: Site, year: number, minBestWm2: number): Promise<YearJudged> {
    const started = Date.now();
    const days: DayDetectorTilt[] = [];
    for (let month = 1; month <= 12; month++) {
      const date = `${year}-${String(month).padStart(2, '0')}-${CANDIDATE_DAY}`;
      days.push(await this.judgeDay(await this.daySkies(site, date, COARSE.everyMs), COARSE.stepDeg, minBestWm2));
    }
    const coarseWorst = worstDay(days);
    const worst =
      coarseWorst && coarseWorst.instants > 0
        ? await this.judgeDay(await this.daySkies(site, coarseWorst.date, FINE.everyMs), FINE.stepDeg, minBestWm2)
        : undefined;
    this.log.debug({ siteId: site.id, year, ms: Date.now() - started }, 'detector tilt of a year judged');
    return { days, worst };
  }

  /** A day judged one instant at a time (tens to a hundred ms each), giving other requests a turn in between. */
  private async judgeDay(day: DaySkies, stepDeg: number, minBestWm2: number): Promise<DayDetectorTilt> {
    const parts: DayDetectorTilt[] = [];
    for (const instant of day.instants) {
      parts.push(dayDetectorTilt({ date: day.date, instants: [instant] }, { stepDeg, minBestWm2, maxDetectorTiltDeg: MAX_TILT_DEG }));
      await new Promise((r) => setImmediate(r));
    }
    return mergeDayDetectorTilts(day.date, parts);
  }

  /** The clear-sky skies of a local date while the sun is up, every `everyMs`. */
  private async daySkies(site: Site, date: string, everyMs: number): Promise<DaySkies> {
    const where = { latitudeDeg: site.latitudeDeg, longitudeDeg: site.longitudeDeg, elevationM: site.elevationM };
    const window = utcWindowOfLocalDate(date);
    const instants: DaySkies['instants'] = [];
    for (let t = window.from.getTime(); t < window.to.getTime(); t += everyMs) {
      if (localDate(t, site.timeZone) !== date || solarPosition(where, t).elevationDeg <= 0) continue;
      instants.push({ atMs: t, sky: (await this.model.skyAt(site.id, t, null)).sky });
    }
    return { date, instants };
  }
}

function dayView(d: DayDetectorTilt): DetectorTiltDay {
  return {
    date: d.date,
    instants: d.instants,
    instantsTooDim: d.instantsTooDim,
    singlePeakDetectorTiltDeg: d.singlePeakDetectorTiltDeg,
    instantsWithoutSinglePeak: d.instantsWithoutSinglePeak,
    maxPeaks: d.maxPeaks,
  };
}
