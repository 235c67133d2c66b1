import type { Logger } from 'pino';
import { TwinModel } from '../../shared/pv-performance/mount-twins';
import type { QuarterModelValues, TelemetryRepository } from '../data/telemetry-repository';
import type { SiteModelService } from './site-model-service';

const QUARTER_MS = 15 * 60_000;

/**
 * Fills the modelled columns of closed 15-minute buckets: one modelled sky per site and bucket (the site's survey and
 * the bucket's mean station weather, else the clear-sky model, at the bucket's midpoint), then per unit the in-plane
 * irradiance at its reported orientation, at its best reachable orientation and on the fixed-tilt and sun-following
 * twins (shared/pv-performance/mount-twins.ts). A sky costs about a landscape (≈ 10 ms); a unit a few microseconds.
 * Runs in the rollup worker, never on the ingest path. Recent skies are kept, so late data re-models a bucket cheaply.
 */
export class QuarterModelService {
  private readonly models = new Map<string, Promise<TwinModel>>();
  /** Buckets modelled (sites × buckets), for tests and the bench. */
  skiesBuilt = 0;

  constructor(
    private readonly telemetry: TelemetryRepository,
    private readonly siteModel: SiteModelService,
    private readonly log: Logger,
    private readonly keep = 512,
  ) {}

  /** Models one closed bucket for the given units. */
  async modelQuarter(bucketMs: number, unitIds: number[]): Promise<void> {
    const rows = await this.telemetry.quarterOrientations(bucketMs, unitIds);
    const bySite = new Map<number, typeof rows>();
    for (const r of rows) {
      let list = bySite.get(r.siteId);
      if (!list) bySite.set(r.siteId, (list = []));
      list.push(r);
    }
    const out: QuarterModelValues[] = [];
    for (const [siteId, units] of bySite) {
      let model: TwinModel;
      try {
        model = await this.twinModel(siteId, bucketMs);
      } catch (err) {
        this.log.warn({ err, siteId, bucket: new Date(bucketMs).toISOString() }, 'bucket model failed; its modelled columns stay empty');
        continue;
      }
      for (const u of units) {
        const v = model.of(u);
        const r = (x: number) => Math.round(x * 100) / 100;
        out.push({ unitId: u.unitId, unitWm2: r(v.unitWm2), bestWm2: r(v.bestWm2), fixedWm2: r(v.fixedWm2), sunWm2: r(v.sunWm2) });
      }
      // A turn for other work between sites (each sky is CPU time).
      await new Promise((res) => setImmediate(res));
    }
    await this.telemetry.setQuarterModel(bucketMs, out);
  }

  private twinModel(siteId: number, bucketMs: number): Promise<TwinModel> {
    const key = `${siteId}|${bucketMs}`;
    let p = this.models.get(key);
    if (!p) {
      p = (async () => {
        const weather = await this.siteModel.weatherMean(siteId, bucketMs, bucketMs + QUARTER_MS);
        const { resolved, inputs } = await this.siteModel.skyAndInputsAt(siteId, bucketMs + QUARTER_MS / 2, weather);
        this.skiesBuilt++;
        return new TwinModel(resolved.sky, inputs.site.latitudeDeg);
      })();
      p.catch(() => this.models.delete(key));
      this.models.set(key, p);
      if (this.models.size > this.keep) this.models.delete(this.models.keys().next().value!);
    }
    return p;
  }
}
