import type { Logger } from 'pino';
import type { ModelPeak, SiteModel, SiteModelProvider } from '../health/site-model';
import { globalMaxOf, siteModelOf } from '../health/site-sky';
import type { SiteModelService } from './site-model-service';

export interface SiteModelCacheOptions {
  now: () => number;
  /** A site model is recomputed when older than this [ms]. */
  modelRefreshMs: number;
  /** …and not used when older than this [ms]. */
  modelMaxAgeMs: number;
  /** Highest tilt units can reach [°] (the modelled global maximum is searched below it). */
  maxTiltDeg: number;
}

/**
 * The site models the health detectors compare units against, built from each site's survey and stored weather.
 * The live engine reads them through `provider()`: cached per site for a few minutes and recomputed in the
 * background (a detector never waits for the landscape engine). Replays and scan results build theirs on demand.
 */
export class SiteModelCache {
  private readonly models = new Map<number, { model: SiteModel; builtMs: number }>();
  private readonly building = new Map<number, Promise<void>>();
  /** Bumped when a site's survey changes, so a build begun from the old survey is not kept. */
  private readonly generation = new Map<number, number>();

  constructor(
    private readonly siteModel: SiteModelService,
    private readonly log: Logger,
    private readonly opts: SiteModelCacheOptions,
  ) {}

  provider(): SiteModelProvider {
    return {
      siteModel: (siteId, atMs) => {
        const hit = this.models.get(siteId);
        const now = this.opts.now();
        if (!hit || now - hit.builtMs > this.opts.modelRefreshMs) this.refresh(siteId);
        if (!hit || Math.abs(hit.model.atMs - atMs) > this.opts.modelMaxAgeMs) return undefined;
        return hit.model;
      },
    };
  }

  /** The model of a site at an instant, built now (throws 404 for an unknown site). */
  async build(siteId: number, atMs: number): Promise<SiteModel> {
    const { resolved, inputs } = await this.siteModel.skyAndInputsAt(siteId, atMs);
    return siteModelOf(resolved, inputs.indoor, atMs, this.opts.maxTiltDeg);
  }

  /** The modelled brightest reachable orientation of a site at an instant (throws 404 for an unknown site). */
  async globalMaxAt(siteId: number, atMs: number): Promise<ModelPeak> {
    const resolved = await this.siteModel.skyAt(siteId, atMs);
    return globalMaxOf(resolved.sky, this.opts.maxTiltDeg);
  }

  /** Forgets a site's model (its survey changed): the next report asks for a new one, built from the new survey. */
  invalidate(siteId: number): void {
    this.models.delete(siteId);
    this.generation.set(siteId, (this.generation.get(siteId) ?? 0) + 1);
    this.building.delete(siteId);
  }

  private refresh(siteId: number): void {
    if (this.building.has(siteId)) return;
    const now = this.opts.now();
    const gen = this.generation.get(siteId) ?? 0;
    const p = this.build(siteId, now)
      .then((model) => {
        if ((this.generation.get(siteId) ?? 0) === gen) this.models.set(siteId, { model, builtMs: now });
      })
      .catch((err) => this.log.warn({ err, siteId }, 'site model for health failed'))
      .finally(() => {
        if (this.building.get(siteId) === p) this.building.delete(siteId);
      });
    this.building.set(siteId, p);
  }
}
