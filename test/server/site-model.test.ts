import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { startTestStack } from '../helpers/test-stack';
import { DEMO_PASSWORD, DEMO_SURVEYS } from '../../seeds/demo-world';

let stack: Awaited<ReturnType<typeof startTestStack>>;
beforeAll(async () => {
  stack = await startTestStack({ seed: true });
});
afterAll(async () => {
  await stack?.stop();
});

const agent = async (email: string) => {
  const a = request.agent(stack.http);
  await a.post('/api/auth/sign-in').send({ email, password: DEMO_PASSWORD }).expect(200);
  return a;
};

describe('site survey', () => {
  it('returns the seeded survey and lets an engineer replace it; a technician may not', async () => {
    const eng = await agent('engineer@saltmarsh.example');
    const sites = (await eng.get('/api/sites')).body as { id: number; name: string }[];
    const roof = sites.find((s) => s.name === 'Harbourside Library Roof')!;
    const got = await eng.get(`/api/sites/${roof.id}/survey`).expect(200);
    expect(got.body.reflectors).toHaveLength(DEMO_SURVEYS['QHL']!.reflectors.length);
    const next = {
      skyType: 5,
      horizon: [
        [0, 5],
        [90, 20],
        [180, 3],
      ],
      reflectors: [],
      lamps: [],
    };
    await eng.put(`/api/sites/${roof.id}/survey`).send(next).expect(200);
    expect((await eng.get(`/api/sites/${roof.id}/survey`)).body).toEqual(next);
    const tech = await agent('tech1@saltmarsh.example');
    expect((await tech.put(`/api/sites/${roof.id}/survey`).send(next)).status).toBe(403);
  });

  it('names the bad parts of a survey and keeps the old one', async () => {
    const eng = await agent('engineer@saltmarsh.example');
    const id = ((await eng.get('/api/sites')).body as { id: number; name: string }[]).find((s) => s.name === 'Eastfield Depot Yard')!.id;
    const before = (await eng.get(`/api/sites/${id}/survey`)).body;
    const res = await eng.put(`/api/sites/${id}/survey`).send({
      skyType: 16,
      horizon: [
        [90, 10],
        [40, 5],
      ],
      reflectors: [{ normalAzimuthDeg: 90 }],
      lamps: [],
      colour: 1,
    });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.fields)).toEqual(
      expect.arrayContaining(['skyType', 'horizon', 'reflectors.0.azimuthFromDeg', 'colour']),
    );
    expect((await eng.get(`/api/sites/${id}/survey`)).body).toEqual(before);
  });

  it('names bad survey fields for people as the form does, counted from 1, and keys them by path for programs', async () => {
    const eng = await agent('engineer@saltmarsh.example');
    const id = ((await eng.get('/api/sites')).body as { id: number; name: string }[]).find((s) => s.name === 'Eastfield Depot Yard')!.id;
    const good = {
      normalAzimuthDeg: 90,
      normalElevationDeg: 0,
      azimuthFromDeg: 60,
      azimuthToDeg: 120,
      elevationFromDeg: 0,
      elevationToDeg: 30,
      reflectance: 0.3,
    };
    const res = await eng.put(`/api/sites/${id}/survey`).send({
      skyType: 'isotropic',
      horizon: [
        [0, 5],
        [30, 5],
        [60, 5],
        [400, 5],
      ],
      reflectors: [{ ...good, reflectance: 2 }],
      lamps: [],
    });
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toEqual({
      'horizon.3.0': 'azimuth must be from 0 to under 360°',
      'reflectors.0.reflectance': 'must be in [0, 1]',
    });
    expect(res.body.error.message).toBe('The survey has 2 invalid field(s): Horizon point 4, azimuth; Facade 1, reflectance.');
  });

  it("models a site's sky from its survey, at noon brighter than at dawn, with weather when recent", async () => {
    const id = (await stack.db('sites').where({ name: 'Eastfield Depot Yard' }).first()).id;
    const noon = Date.parse('2026-06-21T11:00:00Z');
    const clear = await stack.siteModel.skyAt(id, noon);
    expect(clear.sunSource).toBe('SPA');
    expect(clear.input.dhiWm2).toBeGreaterThan(0);
    await stack
      .db('weather')
      .insert({ site_id: id, ts: new Date(noon - 60_000), ghi_wm2: 300, dhi_wm2: 280, air_temp_c: 18, wind_ms: 3, gust_ms: 6 });
    const cloudy = await stack.siteModel.skyAt(id, noon);
    expect(cloudy.input.dhiWm2).toBeCloseTo(280, 6);
    expect(cloudy.input.ghiWm2).toBeCloseTo(300, 6);
  });
});
