import { describe, expect, it } from 'vitest';
import { pino } from 'pino';
import { SiteModelCache } from '../../server/services/site-model-cache';
import type { SiteModelService } from '../../server/services/site-model-service';
import { siteSky } from '../../server/health/site-sky';

// A site model service whose builds the test finishes by hand (no database).
function deferredModels() {
  const site = { latitudeDeg: 48, longitudeDeg: 11, elevationM: 500, albedo: 0.2 };
  const survey = { skyType: 'isotropic' as const, horizon: [], reflectors: [], lamps: [] };
  const pending: (() => void)[] = [];
  const service = {
    skyAndInputsAt: (_siteId: number, atMs: number) =>
      new Promise((resolve) =>
        pending.push(() => resolve({ resolved: siteSky(site, survey, atMs, null), inputs: { site, survey, indoor: false } })),
      ),
  } as unknown as SiteModelService;
  return { service, pending };
}
const settle = () => new Promise((r) => setTimeout(r, 0));

describe('site model cache', () => {
  const now = Date.parse('2026-06-21T11:00:00Z');
  const opts = { now: () => now, modelRefreshMs: 300_000, modelMaxAgeMs: 900_000, maxTiltDeg: 85 };

  it('forgets a site’s model when its survey changes, and drops a build begun from the old survey', async () => {
    const { service, pending } = deferredModels();
    const cache = new SiteModelCache(service, pino({ level: 'silent' }), opts);
    const provider = cache.provider();
    expect(provider.siteModel(1, now)).toBeUndefined(); // first ask starts a build
    pending.shift()!();
    await settle();
    expect(provider.siteModel(1, now)?.atMs).toBe(now);

    cache.invalidate(1);
    expect(provider.siteModel(1, now)).toBeUndefined(); // a new build from the new survey has begun
    expect(pending).toHaveLength(1);
    cache.invalidate(1); // the survey changes again while that build runs
    expect(provider.siteModel(1, now)).toBeUndefined();
    expect(pending).toHaveLength(2);
    pending.shift()!(); // the stale build finishes: not kept
    await settle();
    expect(provider.siteModel(1, now)).toBeUndefined();
    expect(pending).toHaveLength(1); // and the newer build is not started twice
    pending.shift()!();
    await settle();
    expect(provider.siteModel(1, now)?.atMs).toBe(now);
  });
});
