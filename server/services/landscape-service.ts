import type { Site } from '../../shared/contracts/api';
import type { LandscapeDay, LandscapeHour, SiteLandscape } from '../../shared/contracts/landscape';
import { analyseLandscape, bestReachableOrientation, blurLandscape, computeLandscape, STANDARD_UNIT_LIMITS } from '../../shared/landscape';
import { solarPosition } from '../../shared/solar-position';
import type { SiteModelService } from './site-model-service';
import { localDate, utcWindowOfLocalDate } from './local-time';
import { badRequest } from '../errors/app-error';
import type { Logger } from 'pino';

const HOUR_MS = 3_600_000;
const DAY_MS = 24 * HOUR_MS;
/** The traces' modelled-best overlay is sampled every 15 minutes (trace-service); the warmer fills those slots. */
const WARM_SLOT_MS = 15 * 60_000;
const round1 = (x: number) => Math.round(x * 10) / 10;
const roundedBest = (b: { tiltDeg: number; azimuthDeg: number; wm2: number }) => ({
  tiltDeg: b.tiltDeg,
  azimuthDeg: b.azimuthDeg,
  wm2: round1(b.wm2),
});

export interface LandscapeOptions {
  /** Grid step [°], 1…10. */
  stepDeg: number;
  /** Detector tilt for the blurred landscape and basin shares [°], 0…45. */
  detectorTiltDeg: number;
  /** Whether to send the grids (false: maxima only). */
  grid: boolean;
}

/** A small least-recently-used cache. */
class Lru<V> {
  private readonly map = new Map<string, V>();
  constructor(private readonly size: number) {}
  get(k: string): V | undefined {
    const v = this.map.get(k);
    if (v !== undefined) {
      this.map.delete(k);
      this.map.set(k, v);
    }
    return v;
  }
  delete(k: string): void {
    this.map.delete(k);
  }
  set(k: string, v: V): void {
    this.map.delete(k);
    this.map.set(k, v);
    if (this.map.size > this.size) this.map.delete(this.map.keys().next().value!);
  }
}

/**
 * Modelled irradiance landscapes of a site, computed on the server from its survey and weather (the engine is pure
 * CPU work: a 2° landscape with its analysis takes tens of milliseconds, a day of hourly analyses about a second).
 * Day results and modelled-best values are cached; a survey change gives new cache keys.
 */
export class LandscapeService {
  private readonly days = new Lru<Promise<LandscapeDay>>(64);
  /** Room for a warm day (97 slots) of ~200 sites and the odd older request. */
  private readonly bests = new Lru<Promise<number>>(20_000);

  private warmTimer: NodeJS.Timeout | undefined;
  private warming = false;
  private stopped = false;

  constructor(
    private readonly model: SiteModelService,
    private readonly now: () => number = Date.now,
  ) {}

  /**
   * Keeps the modelled best of each site warm for the last day in 15-minute slots — the slots a day of traces overlays —
   * one slot at a time in the background, then each new slot as it comes. Without it the first day of traces opened for
   * a site computes ~100 landscapes while the user waits. Failures (a site removed meanwhile) are logged and skipped.
   * Resolves when the first pass (the last day of every site) is done.
   */
  startWarming(siteIds: () => readonly number[], log: Logger): Promise<void> {
    const run = async () => {
      if (this.warming || this.stopped) return;
      this.warming = true;
      try {
        const now = this.now();
        for (const siteId of siteIds()) {
          for (let t = Math.ceil((now - DAY_MS) / WARM_SLOT_MS) * WARM_SLOT_MS; t <= now && !this.stopped; t += WARM_SLOT_MS) {
            try {
              await this.bestWm2(siteId, t);
            } catch (err) {
              log.warn({ err, siteId }, 'modelled best of a site could not be computed; skipped');
              break;
            }
          }
        }
      } finally {
        this.warming = false;
      }
    };
    this.warmTimer = setInterval(() => void run(), WARM_SLOT_MS);
    this.warmTimer.unref();
    return run();
  }

  stopWarming(): void {
    this.stopped = true;
    clearInterval(this.warmTimer);
  }

  async landscape(site: Site, atMs: number, o: LandscapeOptions): Promise<SiteLandscape> {
    const resolved = await this.model.skyAt(site.id, atMs);
    const sky = resolved.sky;
    const report = analyseLandscape(sky, { stepDeg: o.stepDeg, detectorTiltDeg: o.detectorTiltDeg });
    let grid: SiteLandscape['grid'] = null;
    if (o.grid) {
      const raw = computeLandscape(sky, { stepDeg: o.stepDeg });
      const blurred = blurLandscape(raw, o.detectorTiltDeg);
      grid = {
        tiltsDeg: Array.from(raw.tiltsDeg),
        azimuthsDeg: Array.from(raw.azimuthsDeg),
        values: Array.from(raw.values, round1),
        blurred: Array.from(blurred.values, round1),
      };
    }
    return {
      siteId: site.id,
      at: new Date(atMs).toISOString(),
      sun:
        sky.sunDirection && sky.sunElevationDeg > -0.27
          ? { azimuthDeg: round1(sky.sunAzimuthDeg), elevationDeg: round1(sky.sunElevationDeg) }
          : null,
      magnitudeSource: resolved.magnitudeSource,
      stepDeg: o.stepDeg,
      detectorTiltDeg: o.detectorTiltDeg,
      grid,
      globalMax: roundedBest(bestReachableOrientation(sky, STANDARD_UNIT_LIMITS, { resolutionDeg: o.stepDeg })),
      localMaxima: report.localMaxima.map((p) => ({
        tiltDeg: p.tiltDeg,
        azimuthDeg: p.azimuthDeg,
        wm2: round1(p.wm2),
        prominenceWm2: round1(p.prominenceWm2),
        basinShare: Math.round(p.basinShare * 1000) / 1000,
      })),
      minSinglePeakDetectorTiltDeg: report.minSinglePeakDetectorTiltDeg,
      minProminenceWm2: round1(report.minProminenceWm2),
    };
  }

  /**
   * The modelled best in-plane irradiance of a site at an instant (the best orientation a standard unit reaches, at the
   * shared resolution), cached per 5-minute slot.
   */
  bestWm2(siteId: number, atMs: number): Promise<number> {
    const slot = Math.round(atMs / 300_000) * 300_000;
    const key = `${siteId}|${slot}`;
    let p = this.bests.get(key);
    if (!p) {
      // A turn for other requests first: callers ask for many slots in a row (a day of traces), each tens of ms of CPU.
      p = new Promise<void>((r) => setImmediate(r))
        .then(() => this.model.skyAt(siteId, slot))
        .then(({ sky }) => round1(bestReachableOrientation(sky, STANDARD_UNIT_LIMITS).wm2));
      p.catch(() => this.bests.delete(key));
      this.bests.set(key, p);
    }
    return p;
  }

  /** Every daylight hour of a local date: how many peaks, and the smallest single-peak detector tilt (3° grid). */
  async day(site: Site, date: string): Promise<LandscapeDay> {
    if (!/^\d{4}-\d{2}-\d{2}$/.test(date) || Number.isNaN(Date.parse(`${date}T00:00:00Z`)))
      throw badRequest('The date is not valid.', { date: 'Must be a date YYYY-MM-DD.' });
    const survey = await this.model.survey(site.id);
    const key = `${site.id}|${date}|${site.timeZone}|${site.latitudeDeg},${site.longitudeDeg}|${JSON.stringify(survey)}`;
    let p = this.days.get(key);
    if (!p) {
      p = this.computeDay(site, date);
      p.catch(() => this.days.delete(key));
      this.days.set(key, p);
    }
    return p;
  }

  private async computeDay(site: Site, date: string): Promise<LandscapeDay> {
    const stepDeg = 3;
    const where = { latitudeDeg: site.latitudeDeg, longitudeDeg: site.longitudeDeg, elevationM: site.elevationM };
    const window = utcWindowOfLocalDate(date);
    const hours: LandscapeHour[] = [];
    const sunPath: LandscapeDay['sunPath'] = [];
    for (let t = window.from.getTime(); t < window.to.getTime(); t += HOUR_MS / 4) {
      if (localDate(t, site.timeZone) !== date) continue;
      const sun = solarPosition(where, t);
      if (sun.elevationDeg <= 0) continue;
      sunPath.push({ at: new Date(t).toISOString(), azimuthDeg: round1(sun.azimuthDeg), elevationDeg: round1(sun.elevationDeg) });
      if (t % HOUR_MS !== 0) continue;
      const { sky } = await this.model.skyAt(site.id, t);
      const report = analyseLandscape(sky, { stepDeg, maxDetectorTiltDeg: 30 });
      hours.push({
        at: new Date(t).toISOString(),
        sunElevationDeg: round1(sun.elevationDeg),
        sunAzimuthDeg: round1(sun.azimuthDeg),
        peaks: report.localMaxima.length,
        globalMaxWm2: round1(bestReachableOrientation(sky, STANDARD_UNIT_LIMITS, { resolutionDeg: stepDeg }).wm2),
        minSinglePeakDetectorTiltDeg: report.minSinglePeakDetectorTiltDeg,
      });
      // Give other requests a turn between hours.
      await new Promise((r) => setImmediate(r));
    }
    const tilts = hours.map((h) => h.minSinglePeakDetectorTiltDeg);
    const recommended = !tilts.length || tilts.some((x) => x === null) ? null : Math.max(...(tilts as number[]));
    return { siteId: site.id, date, timeZone: site.timeZone, stepDeg, hours, recommendedDetectorTiltDeg: recommended, sunPath };
  }
}
