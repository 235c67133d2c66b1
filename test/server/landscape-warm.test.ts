import { describe, expect, it } from 'vitest';
import { pino } from 'pino';
import { LandscapeService } from '../../server/services/landscape-service';
import type { SiteModelService } from '../../server/services/site-model-service';
import { parseSkyFile, resolveSkyFile } from '../../shared/sky-file';

const SLOT_MS = 15 * 60_000;

/** A site model that resolves the clear-sky model of one place and counts what it was asked for. */
function countingModel() {
  const asked: { siteId: number; atMs: number }[] = [];
  const model = {
    skyAt: async (siteId: number, atMs: number) => {
      asked.push({ siteId, atMs });
      if (siteId === 99) throw new Error('site 99 is gone');
      return resolveSkyFile(
        parseSkyFile({
          site: { latitudeDeg: 50, longitudeDeg: 8, elevationM: 100 },
          time: new Date(atMs).toISOString(),
          albedo: 0.2,
          skyType: 'isotropic',
          horizon: [],
          reflectors: [],
          lamps: [],
        }),
      );
    },
  } as unknown as SiteModelService;
  return { model, asked };
}

describe('modelled best warming', () => {
  it('computes every 15-minute slot of the last day of each site once, so a day of traces asks for nothing new', async () => {
    const now = Date.parse('2026-06-21T13:07:00Z');
    const { model, asked } = countingModel();
    const service = new LandscapeService(model, () => now);
    await service.startWarming(() => [1, 99, 2], pino({ level: 'silent' }));
    service.stopWarming();

    const slots = (siteId: number) => asked.filter((a) => a.siteId === siteId).map((a) => a.atMs);
    // 24 h of 15-minute slots, both ends included when the first lands on the window's edge: 96 or 97.
    expect(slots(1)).toHaveLength(96);
    expect(slots(1)[0]).toBe(Math.ceil((now - 86_400_000) / SLOT_MS) * SLOT_MS);
    expect(slots(1).every((t) => t % SLOT_MS === 0)).toBe(true);
    // A site that fails is skipped after its first failure; the next site is still warmed.
    expect(slots(99)).toHaveLength(1);
    expect(slots(2)).toHaveLength(96);

    const before = asked.length;
    const noon = Math.floor(now / SLOT_MS) * SLOT_MS - 60 * 60_000;
    const night = Math.floor(now / SLOT_MS) * SLOT_MS - 12 * 3_600_000;
    const [noonWm2, nightWm2] = [await service.bestWm2(1, noon), await service.bestWm2(1, night)];
    expect(asked.length).toBe(before);
    // Near midsummer noon at 50° N under a clear sky the best orientation gets about beam + diffuse: ASHRAE Handbook of
    // Fundamentals 2013 ch. 14 clear-sky model, July solar noon (Atlanta), Eb 846 + Ed 144 W/m². At night the dark-sky
    // shortcut gives exactly 0.
    expect(noonWm2).toBeGreaterThan(800);
    expect(noonWm2).toBeLessThan(1200);
    expect(nightWm2).toBe(0);
  });
});
