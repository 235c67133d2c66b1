import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';
import { hashDeviceSecret } from '../../server/services/device-secret';
import { DEMO_SITES, demoSerials } from '../../shared/demo-world';

const script = (name: string) => fileURLToPath(new URL(`../../server/scripts/${name}`, import.meta.url));
let t: TestDatabase;
let dir: string;
const envOf = (extra: Record<string, string> = {}) => ({
  PATH: process.env['PATH'] ?? '',
  BW_LOG_LEVEL: 'silent',
  BW_BCRYPT_COST: '4',
  BW_DB_HOST: t.config.db.host,
  BW_DB_PORT: String(t.config.db.port),
  BW_DB_NAME: t.config.db.database,
  BW_DB_USER: t.config.db.user,
  BW_DB_PASSWORD: t.config.db.password,
  BW_DEMO_SECRETS_FILE: join(dir, 'secrets.json'),
  ...extra,
});
const run = (file: string, args: string[], extra: Record<string, string> = {}, input?: string) =>
  spawnSync(process.execPath, ['--import', 'tsx', script(file), ...args], { env: envOf(extra), encoding: 'utf8', timeout: 30_000, input });

beforeAll(async () => {
  t = await createTestDatabase();
  dir = mkdtempSync(join(tmpdir(), 'bw-demo-'));
});
afterAll(async () => {
  await t?.drop();
  rmSync(dir, { recursive: true, force: true });
});

describe('demo seeding is an explicit choice', () => {
  it('migrating a new database creates no accounts and no units', async () => {
    const r = run('migrate.ts', ['latest']);
    expect(r.status, r.stderr).toBe(0);
    expect(Number((await t.db('users').count({ n: '*' }))[0]!['n'])).toBe(0);
    expect(Number((await t.db('units').count({ n: '*' }))[0]!['n'])).toBe(0);
  });

  it('the first admin of a real deployment is created by a command, password from the environment', async () => {
    const bad = run('create-admin.ts', ['--email', 'ops@example.org', '--name', 'Ops'], { BW_ADMIN_PASSWORD: 'short' });
    expect(bad.status).toBe(2);
    expect(bad.stderr).toMatch(/password: At least 10 characters/);
    const ok = run('create-admin.ts', ['--email', 'Ops@Example.org', '--name', 'Ops Lead'], { BW_ADMIN_PASSWORD: 'a-long-enough-secret' });
    expect(ok.status, ok.stderr).toBe(0);
    expect(await t.db('users').where({ email: 'ops@example.org' }).first()).toMatchObject({ role: 'admin', name: 'Ops Lead' });
    expect(
      run('create-admin.ts', ['--email', 'ops@example.org', '--name', 'Ops'], { BW_ADMIN_PASSWORD: 'a-long-enough-secret' }).status,
    ).toBe(1);
    await t.db('audit_log').del();
    await t.db('users').del();
  });

  it('--demo seeds the demo world with random device secrets kept in a private file', async () => {
    const r = run('migrate.ts', ['latest', '--demo']);
    expect(r.status, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/demo world seeded/);
    const file = join(dir, 'secrets.json');
    expect(statSync(file).mode & 0o777).toBe(0o600);
    const secrets = JSON.parse(readFileSync(file, 'utf8')) as Record<string, string>;
    expect(Object.keys(secrets).sort()).toEqual(demoSerials().sort());
    expect(new Set(Object.values(secrets)).size).toBe(demoSerials().length);
    const serial = demoSerials()[0]!;
    const row = await t.db('units').where({ serial }).first();
    expect(row.device_secret_hash).toBe(hashDeviceSecret(secrets[serial]!));
    // Ten sites of six owners, each owner with an owner account, every site with its zone and units.
    const sites = await t
      .db('sites')
      .join('owners', 'owners.id', 'sites.owner_id')
      .select('sites.id', 'sites.name', 'sites.time_zone', 'owners.name as owner');
    expect(sites.map((x) => [x.name, x.owner, x.time_zone]).sort()).toEqual(DEMO_SITES.map((x) => [x.name, x.owner, x.time_zone]).sort());
    expect(Number((await t.db('units').count({ n: '*' }))[0]!['n'])).toBe(48);
    const wattlebank = sites.filter((x) => x.owner === 'Wattlebank Islands Energy Co-op').map((x) => x.id);
    expect(await t.db('units').whereIn('site_id', wattlebank).orderBy('serial').pluck('serial')).toEqual([
      'WKM-2401',
      'WKM-2402',
      'WKM-2403',
      'WKM-2404',
      'WKM-2405',
      'WRF-2401',
      'WRF-2402',
      'WRF-2403',
      'WRF-2404',
    ]);
    const stations = await t.db('units').where({ weather_station: true }).orderBy('serial').pluck('serial');
    expect(stations).toEqual(
      DEMO_SITES.filter((x) => !x.indoor)
        .map((x) => `${x.code}-2401`)
        .sort(),
    );
    const owners = await t.db('users').join('owners', 'owners.id', 'users.owner_id').where('users.role', 'owner').pluck('owners.name');
    expect(owners.sort()).toEqual([...new Set(DEMO_SITES.map((x) => x.owner))].sort());
    // Seeding again leaves the data and the secrets alone.
    expect(run('migrate.ts', ['demo']).stdout).toMatch(/demo seed skipped/);
    expect(JSON.parse(readFileSync(file, 'utf8'))).toEqual(secrets);
  });

  it('a lost secrets file gives the demo units new secrets instead of leaving the simulator locked out', async () => {
    rmSync(join(dir, 'secrets.json'));
    const r = run('migrate.ts', ['demo']);
    expect(r.stdout).toMatch(/new device secrets/);
    const secrets = JSON.parse(readFileSync(join(dir, 'secrets.json'), 'utf8')) as Record<string, string>;
    const serial = demoSerials()[3]!;
    expect((await t.db('units').where({ serial }).first()).device_secret_hash).toBe(hashDeviceSecret(secrets[serial]!));
  });
});
