import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { startTestStack } from '../helpers/test-stack';
import { DEMO_PASSWORD, DEMO_USERS } from '../../seeds/demo-world';
import type { Role } from '../../shared/contracts/api';

let stack: Awaited<ReturnType<typeof startTestStack>>;
const agents = new Map<Role | 'anonymous', request.Agent>();
let n = 0;

beforeAll(async () => {
  stack = await startTestStack({ seed: true });
  agents.set('anonymous', request.agent(stack.http));
  for (const role of ['admin', 'engineer', 'technician', 'crew', 'owner'] as const) {
    const u = DEMO_USERS.find((d) => d.role === role)!;
    const a = request.agent(stack.http);
    await a.post('/api/auth/sign-in').send({ email: u.email, password: DEMO_PASSWORD }).expect(200);
    agents.set(role, a);
  }
});
afterAll(async () => {
  await stack?.stop();
});

type Cell = { method: 'get' | 'post' | 'patch'; path: string; body?: () => object };
const site = () => ({
  ownerId: 2,
  name: `Matrix Site ${++n}`,
  latitudeDeg: 50,
  longitudeDeg: 8,
  elevationM: 100,
  timeZone: 'Europe/Berlin',
  albedo: 0.2,
});
const unit = () => ({
  serial: `MX-${++n}`,
  siteId: 3,
  ratedPowerWp: 400,
  detectorTiltDeg: 20,
  tiltMinDeg: 0,
  tiltMaxDeg: 85,
  azimuthMinDeg: 0,
  azimuthMaxDeg: 360,
  planXM: 0,
  planYM: 0,
  firmware: '2.4.1',
});

// Every admin route, and the status each role gets (admin: success; others: 403; anonymous: 401).
const adminOnly: Cell[] = [
  { method: 'get', path: '/api/users' },
  {
    method: 'post',
    path: '/api/users',
    body: () => ({ email: `m${++n}@saltmarsh.example`, name: 'Matrix Person', role: 'technician', password: 'long-enough-pw' }),
  },
  { method: 'patch', path: '/api/users/4', body: () => ({ name: 'Tomasz Velde' }) },
  { method: 'post', path: '/api/users/4/password', body: () => ({ password: DEMO_PASSWORD }) },
  { method: 'get', path: '/api/owners' },
  { method: 'post', path: '/api/owners', body: () => ({ name: `Matrix Owner ${++n}` }) },
  { method: 'patch', path: '/api/owners/2', body: () => ({ contactEmail: 'estates@fenwicklane.example' }) },
  { method: 'post', path: '/api/sites', body: site },
  { method: 'patch', path: '/api/sites/1', body: () => ({ albedo: 0.3 }) },
  { method: 'post', path: '/api/units', body: unit },
  { method: 'patch', path: '/api/units/1', body: () => ({ firmware: '2.4.1' }) },
  { method: 'post', path: '/api/units/1/secret' },
];
const adminStatus: Record<string, number> = { get: 200, patch: 200, post: 201 };
const expected = (c: Cell, role: Role | 'anonymous') => {
  if (role === 'anonymous') return 401;
  if (role !== 'admin') return 403;
  if (c.path.endsWith('/password')) return 204;
  if (c.path.endsWith('/secret')) return 200;
  return adminStatus[c.method]!;
};

describe('role × route matrix for admin routes', () => {
  for (const c of adminOnly) {
    for (const role of ['anonymous', 'admin', 'engineer', 'technician', 'crew', 'owner'] as const) {
      it(`${c.method.toUpperCase()} ${c.path} as ${role} → ${expected(c, role)}`, async () => {
        const res = await agents
          .get(role)!
          [c.method](c.path)
          .send(c.body?.() ?? {});
        expect(res.status).toBe(expected(c, role));
      });
    }
  }

  for (const role of ['engineer', 'technician', 'crew', 'owner', 'admin'] as const) {
    it(`GET /api/sites and /api/units as ${role} → 200`, async () => {
      expect((await agents.get(role)!.get('/api/sites')).status).toBe(200);
      expect((await agents.get(role)!.get('/api/units')).status).toBe(200);
    });
  }
});

describe('owner isolation', () => {
  it("an owner sees only their own sites and units, and 404 for another owner's", async () => {
    const owner = agents.get('owner')!; // Quillmoor Energy Cooperative (owner 1)
    const sites = (await owner.get('/api/sites')).body as { name: string; ownerId: number; id: number }[];
    expect(sites.map((s) => s.name).sort()).toEqual(['Eastfield Depot Yard', 'Harbourside Library Roof']);
    const units = (await owner.get('/api/units')).body as { siteId: number; serial: string }[];
    expect(units).toHaveLength(12);
    expect(new Set(units.map((u) => u.siteId))).toEqual(new Set(sites.map((s) => s.id)));

    const all = (await agents.get('admin')!.get('/api/sites')).body as { id: number; ownerId: number }[];
    const foreign = all.find((s) => s.ownerId !== 1)!;
    const foreignUnits = (await agents.get('admin')!.get(`/api/units?siteId=${foreign.id}`)).body as { id: number }[];
    expect((await owner.get(`/api/sites/${foreign.id}`)).status).toBe(404);
    expect((await owner.get(`/api/units/${foreignUnits[0]!.id}`)).status).toBe(404);
    expect((await owner.get(`/api/units?siteId=${foreign.id}`)).body).toEqual([]);
  });
});

describe('validation', () => {
  it('names every bad field of a site and writes nothing', async () => {
    const admin = agents.get('admin')!;
    const before = (await admin.get('/api/sites')).body.length;
    const res = await admin.post('/api/sites').send({
      ownerId: 1,
      name: '',
      latitudeDeg: 95,
      longitudeDeg: 'east',
      elevationM: 0,
      timeZone: 'Mars/Olympus',
      albedo: 2,
      colour: 'red',
    });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation_failed');
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['albedo', 'colour', 'latitudeDeg', 'longitudeDeg', 'name', 'timeZone']);
    expect(res.body.error.fields.latitudeDeg).toBe('Must be between -90 and 90 °.');
    expect(res.body.error.fields.colour).toBe('Unknown field.');
    expect((await admin.get('/api/sites')).body.length).toBe(before);
  });

  it('checks unit axis limits and duplicate serials', async () => {
    const admin = agents.get('admin')!;
    const bad = await admin.post('/api/units').send({ ...unit(), tiltMinDeg: 50, tiltMaxDeg: 40 });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields).toEqual({ tiltMaxDeg: 'Must be greater than the minimum tilt.' });
    const dup = await admin.post('/api/units').send({ ...unit(), serial: 'QHL-2401' });
    expect(dup.status).toBe(409);
    expect(dup.body.error.fields).toEqual({ serial: 'Already in use.' });
  });

  it('creates a unit with a one-time device secret that differs after rotation', async () => {
    const admin = agents.get('admin')!;
    const res = await admin.post('/api/units').send(unit());
    expect(res.status).toBe(201);
    expect(res.body.deviceSecret).toMatch(/^[A-Za-z0-9_-]{43}$/);
    expect(JSON.stringify((await admin.get(`/api/units/${res.body.unit.id}`)).body)).not.toContain(res.body.deviceSecret);
    const rotated = await admin.post(`/api/units/${res.body.unit.id}/secret`);
    expect(rotated.body.deviceSecret).not.toBe(res.body.deviceSecret);
  });

  it('requires an owner for owner users and refuses one for staff', async () => {
    const admin = agents.get('admin')!;
    const a = await admin.post('/api/users').send({ email: 'x1@quillmoor.example', name: 'X', role: 'owner', password: 'long-enough-pw' });
    expect(a.status).toBe(400);
    expect(a.body.error.fields).toEqual({ ownerId: 'Choose the owner.' });
    const b = await admin
      .post('/api/users')
      .send({ email: 'x2@saltmarsh.example', name: 'X', role: 'crew', ownerId: 1, password: 'long-enough-pw' });
    expect(b.body.error.fields).toEqual({ ownerId: 'Leave empty for this role.' });
    const c = await admin.post('/api/users').send({ email: 'not-an-email', name: 'X', role: 'pilot', password: 'short' });
    expect(Object.keys(c.body.error.fields).sort()).toEqual(['email', 'password', 'role']);
  });
});
