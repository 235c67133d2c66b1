import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { startTestStack } from '../helpers/test-stack';
import { DEMO_PASSWORD } from '../../seeds/demo-world';
import type { LandscapeDay, SiteLandscape } from '../../shared/contracts/landscape';

let stack: Awaited<ReturnType<typeof startTestStack>>;
let roof: number;
let depot: number;
let atrium: number;
beforeAll(async () => {
  stack = await startTestStack({ seed: true });
  const id = async (name: string) => (await stack.db('sites').where({ name }).first('id')).id as number;
  roof = await id('Harbourside Library Roof');
  depot = await id('Eastfield Depot Yard');
  atrium = await id('Glasshouse Atrium');
});
afterAll(async () => {
  await stack?.stop();
});

const agent = async (email: string) => {
  const a = request.agent(stack.http);
  await a.post('/api/auth/sign-in').send({ email, password: DEMO_PASSWORD }).expect(200);
  return a;
};

describe('site landscape', () => {
  it('gives the grid, the blurred grid, the sun and maxima whose basin shares add up to one', async () => {
    const eng = await agent('engineer@saltmarsh.example');
    const res = await eng.get(`/api/sites/${roof}/landscape?at=2026-06-21T15:00:00Z&detectorTiltDeg=4&stepDeg=2`).expect(200);
    const l = res.body as SiteLandscape;
    expect(l.grid!.tiltsDeg).toHaveLength(46);
    expect(l.grid!.azimuthsDeg).toHaveLength(180);
    expect(l.grid!.values).toHaveLength(46 * 180);
    expect(l.grid!.blurred).toHaveLength(46 * 180);
    expect(l.grid!.values.every((v) => Math.round(v * 10) === v * 10 || Math.abs(Math.round(v * 10) - v * 10) < 1e-6)).toBe(true);
    expect(l.sun!.elevationDeg).toBeGreaterThan(20);
    // The best is what a standard unit (tilt 0…85°) can reach: here the landscape's peak is a vertical facade image
    // (tilt 90°, out of reach), so the best sits on the tilt limit, below that peak and above every reachable grid value.
    const g = l.grid!;
    const reachable = g.values.filter((_, k) => g.tiltsDeg[Math.floor(k / g.azimuthsDeg.length)]! <= 85);
    expect(l.globalMax.tiltDeg).toBeLessThanOrEqual(85);
    expect(l.globalMax.wm2).toBeGreaterThanOrEqual(Math.max(...reachable));
    expect(l.globalMax.wm2).toBeLessThanOrEqual(Math.max(...l.localMaxima.map((p) => p.wm2)));
    expect(Math.max(...g.values)).toBeCloseTo(Math.max(...l.localMaxima.map((p) => p.wm2)), 0);
    expect(l.localMaxima.reduce((s, p) => s + p.basinShare, 0)).toBeCloseTo(1, 2);
    // The blurred landscape is smoother: its peak is no higher than the raw one.
    expect(Math.max(...l.grid!.blurred)).toBeLessThanOrEqual(Math.max(...l.grid!.values) + 0.1);
  });

  it('finds more than one peak at the roof between glass towers in the morning, and the blur needed to remove them', async () => {
    const eng = await agent('engineer@saltmarsh.example');
    const l = (await eng.get(`/api/sites/${roof}/landscape?at=2026-06-21T07:00:00Z&grid=false`).expect(200)).body as SiteLandscape;
    expect(l.grid).toBeNull();
    expect(l.localMaxima.length).toBeGreaterThan(1);
    expect(l.minSinglePeakDetectorTiltDeg).toBeGreaterThan(0.5);
  });

  it('answers the modelled best quickly and refuses bad input', async () => {
    const eng = await agent('engineer@saltmarsh.example');
    const best = (await eng.get(`/api/sites/${depot}/landscape/best?at=2026-06-21T11:00:00Z`).expect(200)).body;
    expect(best.wm2).toBeGreaterThan(700);
    const night = (await eng.get(`/api/sites/${depot}/landscape/best?at=2026-06-21T23:30:00Z`).expect(200)).body;
    expect(night.wm2).toBeLessThan(best.wm2 / 5);
    const bad = await eng.get(`/api/sites/${depot}/landscape?detectorTiltDeg=60&stepDeg=0.1`);
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields)).toEqual(expect.arrayContaining(['detectorTiltDeg', 'stepDeg']));
    const owner = await agent('owner@quillmoor.example');
    expect((await owner.get(`/api/sites/${atrium}/landscape`)).status).toBe(403);
  });
});

describe('landscape over a day', () => {
  it('lists every daylight hour in the site time zone with the smallest single-peak detector tilt, and caches it', async () => {
    const eng = await agent('engineer@saltmarsh.example');
    let started = Date.now();
    const day = (await eng.get(`/api/sites/${roof}/landscape/day?date=2026-06-21`).expect(200)).body as LandscapeDay;
    const first = Date.now() - started;
    expect(day.timeZone).toBe('Europe/Berlin');
    // Hamburg at midsummer: about 17 daylight hours; every listed hour is on that local date.
    expect(day.hours.length).toBeGreaterThanOrEqual(16);
    expect(day.hours.length).toBeLessThanOrEqual(18);
    for (const h of day.hours) {
      expect(new Intl.DateTimeFormat('en-CA', { timeZone: 'Europe/Berlin' }).format(new Date(h.at))).toBe('2026-06-21');
      expect(h.sunElevationDeg).toBeGreaterThan(0);
    }
    const tilts = day.hours.map((h) => h.minSinglePeakDetectorTiltDeg);
    expect(day.recommendedDetectorTiltDeg).toBe(tilts.includes(null) ? null : Math.max(...(tilts as number[])));
    // The facade reflection makes mornings two-peaked on this roof.
    expect(day.hours.some((h) => h.peaks > 1)).toBe(true);
    expect(day.sunPath.length).toBeGreaterThan(day.hours.length * 3);
    started = Date.now();
    await eng.get(`/api/sites/${roof}/landscape/day?date=2026-06-21`).expect(200);
    expect(Date.now() - started).toBeLessThan(Math.max(100, first / 4));
    expect((await eng.get(`/api/sites/${roof}/landscape/day?date=2026-13-45`)).status).toBe(400);
  });
});
