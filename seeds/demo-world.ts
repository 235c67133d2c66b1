import bcrypt from 'bcryptjs';
import type { Knex } from 'knex';
import { hashDeviceSecret, newDeviceSecret } from '../server/services/device-secret';
import type { SiteSurvey } from '../shared/contracts/survey';
import { CITY_HORIZON, FACADES } from '../simulator/scenarios/glass-facade';
import { COURTYARD_HORIZON } from '../simulator/scenarios/urban-canyon';
import { ATRIUM_LAMPS, ATRIUM_WALL_DEG } from '../simulator/scenarios/atrium-lamps';

/**
 * The invented demo world: an O&M operator ("Saltmarsh Field Services"), two owners, four sites and 24 units.
 * Names, people and serials are made up; coordinates are realistic. Demo only — never used by tests of the computation.
 */
export const DEMO_PASSWORD = 'brightward-demo';

export const DEMO_USERS = [
  { email: 'admin@saltmarsh.example', name: 'Ada Kestrel', role: 'admin', owner: null },
  { email: 'engineer@saltmarsh.example', name: 'Ravi Lindqvist', role: 'engineer', owner: null },
  { email: 'tech1@saltmarsh.example', name: 'Mara Okonjo', role: 'technician', owner: null },
  { email: 'tech2@saltmarsh.example', name: 'Tomasz Velde', role: 'technician', owner: null },
  { email: 'crew1@saltmarsh.example', name: 'Ines Calder', role: 'crew', owner: null },
  { email: 'crew2@saltmarsh.example', name: 'Kwame Ruiz', role: 'crew', owner: null },
  { email: 'owner@quillmoor.example', name: 'Priya Halvorsen', role: 'owner', owner: 'Quillmoor Energy Cooperative' },
  { email: 'owner@fenwicklane.example', name: 'Jonah Whitcombe', role: 'owner', owner: 'Fenwick Lane Schools Trust' },
] as const;

export const DEMO_OWNERS = [
  { name: 'Quillmoor Energy Cooperative', contact_email: 'accounts@quillmoor.example' },
  { name: 'Fenwick Lane Schools Trust', contact_email: 'estates@fenwicklane.example' },
];

export const DEMO_SITES = [
  { owner: 'Quillmoor Energy Cooperative', name: 'Harbourside Library Roof', code: 'QHL', latitude_deg: 53.5413, longitude_deg: 9.9937, elevation_m: 24, time_zone: 'Europe/Berlin', albedo: 0.3, indoor: false },
  { owner: 'Quillmoor Energy Cooperative', name: 'Eastfield Depot Yard', code: 'QED', latitude_deg: 53.5738, longitude_deg: 10.0806, elevation_m: 11, time_zone: 'Europe/Berlin', albedo: 0.18, indoor: false },
  { owner: 'Fenwick Lane Schools Trust', name: 'Fenwick Lane School Courtyard', code: 'FSC', latitude_deg: 51.459, longitude_deg: -2.587, elevation_m: 42, time_zone: 'Europe/London', albedo: 0.2, indoor: false },
  { owner: 'Fenwick Lane Schools Trust', name: 'Glasshouse Atrium', code: 'FGA', latitude_deg: 51.4545, longitude_deg: -2.5979, elevation_m: 15, time_zone: 'Europe/London', albedo: 0.5, indoor: true },
];

export const UNITS_PER_SITE = 6;

/** Site surveys of the demo world: the same geometry the simulator's scenarios use, so model and demo fleet agree. */
export const DEMO_SURVEYS: Record<string, SiteSurvey> = {
  QHL: { skyType: 12, horizon: CITY_HORIZON.map(([a, e]) => [a, e]), reflectors: FACADES.map((f) => ({ normalElevationDeg: 0, ...f })), lamps: [] },
  QED: { skyType: 12, horizon: [], reflectors: [], lamps: [] },
  FSC: { skyType: 12, horizon: COURTYARD_HORIZON.map(([a, e]) => [a, e]), reflectors: [], lamps: [] },
  FGA: { skyType: 'isotropic', horizon: [[0, ATRIUM_WALL_DEG]], reflectors: [], lamps: ATRIUM_LAMPS.map(({ azimuthDeg, elevationDeg, irradianceWm2 }) => ({ azimuthDeg, elevationDeg, irradianceWm2 })) },
};

/** Detector tilt per unit index: most units well set up, a few too narrow for a cluttered sky (they can be trapped). */
export const DETECTOR_TILTS_DEG = [20, 20, 15, 20, 8, 20];

export const demoSerial = (siteCode: string, i: number) => `${siteCode}-${String(2401 + i)}`;

/** Every serial of the demo world, site by site. */
export const demoSerials = (): string[] => DEMO_SITES.flatMap((s) => Array.from({ length: UNITS_PER_SITE }, (_, i) => demoSerial(s.code, i)));

export interface DemoSeedOptions {
  bcryptCost?: number;
  /** Device secret of each demo unit; by default a fresh random one (tests pass their own). */
  deviceSecretOf?: (serial: string) => string;
}

export interface DemoSeedResult {
  seeded: boolean;
  /** serial → device secret of the units just created (empty when nothing was seeded); the simulator needs them. */
  deviceSecrets: Record<string, string>;
}

/**
 * Fills an empty database with the demo world. Refuses to touch a database that already has owners. Device secrets are
 * random unless the caller chooses them: a serial must never be enough to connect as a unit.
 */
export async function seedDemoWorld(db: Knex, opts: DemoSeedOptions = {}): Promise<DemoSeedResult> {
  const [{ n }] = (await db('owners').count({ n: '*' })) as [{ n: number | string }];
  if (Number(n) > 0) return { seeded: false, deviceSecrets: {} };
  const secretOf = opts.deviceSecretOf ?? (() => newDeviceSecret());
  const deviceSecrets: Record<string, string> = {};
  const passwordHash = await bcrypt.hash(DEMO_PASSWORD, opts.bcryptCost ?? 10);
  await db.transaction(async (trx) => {
    const ownerIds = new Map<string, number>();
    for (const o of DEMO_OWNERS) ownerIds.set(o.name, (await trx('owners').insert(o))[0] as number);
    for (const s of DEMO_SITES) {
      const { owner, code, ...site } = s;
      const [siteId] = await trx('sites').insert({ ...site, owner_id: ownerIds.get(owner), survey: JSON.stringify(DEMO_SURVEYS[code]) });
      const rows = Array.from({ length: UNITS_PER_SITE }, (_, i) => {
        const serial = demoSerial(code, i);
        deviceSecrets[serial] = secretOf(serial);
        return {
          serial, site_id: siteId, rated_power_wp: 420, detector_tilt_deg: DETECTOR_TILTS_DEG[i],
          tilt_min_deg: 0, tilt_max_deg: 85, azimuth_min_deg: 0, azimuth_max_deg: 360,
          plan_x_m: (i % 3) * 6, plan_y_m: Math.floor(i / 3) * 5, firmware: '2.4.1',
          device_secret_hash: hashDeviceSecret(deviceSecrets[serial]!),
          weather_station: i === 0 && !s.indoor,
        };
      });
      await trx('units').insert(rows);
    }
    await trx('users').insert(
      DEMO_USERS.map((u) => ({ email: u.email, name: u.name, role: u.role, owner_id: u.owner ? ownerIds.get(u.owner) : null, password_hash: passwordHash })),
    );
  });
  return { seeded: true, deviceSecrets };
}

/**
 * Gives the demo units new random secrets (the simulator's secrets file was lost, or the database predates random demo
 * secrets). Only units with demo serials are touched; returns serial → new secret.
 */
export async function rekeyDemoUnits(db: Knex): Promise<Record<string, string>> {
  const serials: string[] = await db('units').whereIn('serial', demoSerials()).pluck('serial');
  const secrets: Record<string, string> = {};
  await db.transaction(async (trx) => {
    for (const serial of serials) {
      secrets[serial] = newDeviceSecret();
      await trx('units').where({ serial }).update({ device_secret_hash: hashDeviceSecret(secrets[serial]) });
    }
  });
  return secrets;
}
