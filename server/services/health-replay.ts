import type { DetectorRunRequest, DetectorRunResult } from '../../shared/contracts/alarms';
import type { AlarmRepository } from '../data/alarm-repository';
import type { HealthReadRepository } from '../data/health-read-repository';
import { badRequest, notFound } from '../errors/app-error';
import { alarmView } from '../health/alarm-view';
import { HealthEngine } from '../health/health-engine';
import type { SiteModel } from '../health/site-model';
import type { AdminService } from './admin-service';
import { scopeOf, type Caller } from './caller';
import type { HealthSettingsService } from './health-settings-service';
import type { SiteModelCache } from './site-model-cache';
import { unitRefOf, type UnitDirectory, type UnitInfo } from './unit-directory';

/** Longest on-demand run [h] and most reports it reads. */
const RUN_MAX_HOURS = 48;
const RUN_MAX_ROWS = 400_000;
/** One site model per this much of the range [ms]. */
const SLOT_MS = 10 * 60_000;

/** Most stored alarms a run lists beside its own. */
const STORED_MAX = 1000;

export type RunRequest = DetectorRunRequest;
export type RunResult = DetectorRunResult;

/** The detectors run over stored telemetry of a range, on their own engine (nothing is stored or pushed). */
export class HealthReplay {
  constructor(
    private readonly reads: HealthReadRepository,
    private readonly admin: AdminService,
    private readonly units: UnitDirectory,
    private readonly models: SiteModelCache,
    private readonly settings: HealthSettingsService,
    private readonly stored: AlarmRepository,
  ) {}

  /**
   * Runs the detectors over stored telemetry of a range (not persisted): the alarms they would have raised, beside the
   * alarms stored for the same units and range. Models come from the site survey with the stored weather, one per 10
   * minutes.
   */
  async runRange(c: Caller, req: RunRequest): Promise<RunResult> {
    const from = Date.parse(req.from);
    const to = Date.parse(req.to);
    if (!(from < to)) throw badRequest('The range is empty.', { to: 'Must be after from.' });
    if (to - from > RUN_MAX_HOURS * 3_600_000)
      throw badRequest(`The range is longer than ${RUN_MAX_HOURS} h.`, { to: `At most ${RUN_MAX_HOURS} h after from.` });
    const visible = new Set((await this.admin.listUnits(c)).map((u) => u.id));
    const ids = (req.unitIds ?? [...visible]).filter((id) => visible.has(id));
    if (req.unitIds && ids.length !== req.unitIds.length) throw notFound('Unit');
    const infos = ids.map((id) => this.units.byUnitId(id)).filter((u): u is UnitInfo => !!u);
    const rows = infos.length
      ? await this.reads.telemetryRange(
          infos.map((u) => u.id),
          new Date(from),
          new Date(to),
          RUN_MAX_ROWS,
        )
      : [];
    const slotMs = SLOT_MS;
    const cache = new Map<string, SiteModel | undefined>();
    for (const siteId of new Set(infos.map((u) => u.siteId))) {
      for (let s = Math.floor(from / slotMs) * slotMs; s < to; s += slotMs)
        cache.set(`${siteId}@${s}`, await this.models.build(siteId, s + slotMs / 2).catch(() => undefined));
    }
    let clock = from;
    const engine = new HealthEngine({
      now: () => clock,
      models: { siteModel: (siteId, atMs) => cache.get(`${siteId}@${Math.floor(atMs / slotMs) * slotMs}`) },
      settingsFor: (siteId) => this.settings.forSite(siteId),
    });
    const byId = new Map(infos.map((u) => [u.id, unitRefOf(u)]));
    let lastTick = from;
    for (const { unitId, t } of rows) {
      clock = Date.parse(t.ts);
      if (clock - lastTick >= 5000) {
        engine.tick();
        lastTick = clock;
      }
      engine.telemetry(byId.get(unitId)!, t);
    }
    clock = to;
    engine.tick();
    const alarms = engine.book.all().map((a, i) => alarmView(-(i + 1), a));
    const stored = await this.stored.overlapping(scopeOf(c), {
      unitIds: infos.map((u) => u.id),
      siteIds: [...new Set(infos.map((u) => u.siteId))],
      from: new Date(from),
      to: new Date(to),
      limit: STORED_MAX,
    });
    return {
      from: new Date(from).toISOString(),
      to: new Date(to).toISOString(),
      units: infos.length,
      reports: rows.length,
      alarms,
      stored,
    };
  }
}
