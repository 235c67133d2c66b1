import bcrypt from 'bcryptjs';
import type { Knex } from 'knex';
import type { SiteSurvey } from '../shared/contracts/survey';
import {
  ATRIUM_LAMPS,
  ATRIUM_WALL_DEG,
  CITY_HORIZON,
  COURTYARD_HORIZON,
  DEMO_SITES,
  DEMO_UNIT,
  DETECTOR_TILTS_DEG,
  FACADES,
  demoSerial,
  demoSerials,
} from '../shared/demo-world';

/**
 * The invented demo world: an O&M operator ("Saltmarsh Field Services"), six owners on four continents, ten sites and
 * 48 units.
 * Names, people and serials are made up; sites, units and their geometry come from shared/demo-world, which the simulator
 * runs too. Demo only — never used by tests of the computation.
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
  { email: 'owner@tindara.example', name: 'Camila Arroyo', role: 'owner', owner: 'Tindara Water Cooperative' },
  { email: 'owner@nyasoro.example', name: 'Wanjiru Otieno', role: 'owner', owner: 'Nyasoro Clinics Trust' },
  { email: 'owner@wattlebank.example', name: 'Isla Brennan', role: 'owner', owner: 'Wattlebank Islands Energy Co-op' },
  { email: 'owner@cedarflats.example', name: 'Dale Marchetti', role: 'owner', owner: 'Cedar Flats Irrigation District' },
] as const;

export const DEMO_OWNERS = [
  { name: 'Quillmoor Energy Cooperative', contact_email: 'accounts@quillmoor.example' },
  { name: 'Fenwick Lane Schools Trust', contact_email: 'estates@fenwicklane.example' },
  { name: 'Tindara Water Cooperative', contact_email: 'accounts@tindara.example' },
  { name: 'Nyasoro Clinics Trust', contact_email: 'facilities@nyasoro.example' },
  { name: 'Wattlebank Islands Energy Co-op', contact_email: 'office@wattlebank.example' },
  { name: 'Cedar Flats Irrigation District', contact_email: 'billing@cedarflats.example' },
];

/** An open site: flat horizon, nothing that mirrors the sun, the usual sky of its scenario. */
const openSurvey = (skyType: SiteSurvey['skyType']): SiteSurvey => ({ skyType, horizon: [], reflectors: [], lamps: [] });

/** Site surveys of the demo world: the same geometry the simulator's scenarios use, so model and demo fleet agree. */
export const DEMO_SURVEYS: Record<string, SiteSurvey> = {
  QHL: {
    skyType: 12,
    horizon: CITY_HORIZON.map(([a, e]) => [a, e]),
    reflectors: FACADES.map((f) => ({ normalElevationDeg: 0, ...f })),
    lamps: [],
  },
  QED: { skyType: 12, horizon: [], reflectors: [], lamps: [] },
  FSC: { skyType: 12, horizon: COURTYARD_HORIZON.map(([a, e]) => [a, e]), reflectors: [], lamps: [] },
  FGA: {
    skyType: 'isotropic',
    horizon: [[0, ATRIUM_WALL_DEG]],
    reflectors: [],
    lamps: ATRIUM_LAMPS.map(({ azimuthDeg, elevationDeg, irradianceWm2 }) => ({ azimuthDeg, elevationDeg, irradianceWm2 })),
  },
  // The open daylight sites: CIE clear sky (type 12) under clear, gusty and broken-cloud scenarios; the overcast one's
  // dome is the traditional overcast sky (Moon & Spencer) its scenario uses.
  TPS: openSurvey('moon-spencer'),
  TMS: openSurvey(12),
  NKR: openSurvey(12),
  WRF: openSurvey(12),
  WKM: openSurvey(12),
  CPY: openSurvey(12),
};

export interface DemoSeedOptions {
  bcryptCost?: number;
  /** Device secret of each demo unit; by default a fresh random one (tests pass their own). */
  deviceSecretOf?: (serial: string) => string;
}

/**
 * The server's device-secret functions (server/services/device-secret.ts), passed in so that seeds/ never imports the
 * server that imports seeds/.
 */
export interface DeviceSecretTools {
  newDeviceSecret(): string;
  hashDeviceSecret(secret: string): string;
  /** The hash the external message engine checks (bcrypt); left out, units get none (tests that do not use the engine). */
  engineSecretHash?(secret: string): string;
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
export async function seedDemoWorld(db: Knex, tools: DeviceSecretTools, opts: DemoSeedOptions = {}): Promise<DemoSeedResult> {
  const [{ n }] = (await db('owners').count({ n: '*' })) as [{ n: number | string }];
  if (Number(n) > 0) return { seeded: false, deviceSecrets: {} };
  const secretOf = opts.deviceSecretOf ?? (() => tools.newDeviceSecret());
  const deviceSecrets: Record<string, string> = {};
  const passwordHash = await bcrypt.hash(DEMO_PASSWORD, opts.bcryptCost ?? 10);
  await db.transaction(async (trx) => {
    const ownerIds = new Map<string, number>();
    for (const o of DEMO_OWNERS) ownerIds.set(o.name, (await trx('owners').insert(o))[0] as number);
    for (const s of DEMO_SITES) {
      const { owner, code, units, ...site } = s;
      const survey = DEMO_SURVEYS[code];
      if (!survey) throw new Error(`demo site ${code} has no survey in DEMO_SURVEYS`);
      const [siteId] = await trx('sites').insert({ ...site, owner_id: ownerIds.get(owner), survey: JSON.stringify(survey) });
      const rows = Array.from({ length: units }, (_, i) => {
        const serial = demoSerial(code, i);
        deviceSecrets[serial] = secretOf(serial);
        return {
          serial,
          site_id: siteId,
          rated_power_wp: DEMO_UNIT.ratedPowerWp,
          detector_tilt_deg: DETECTOR_TILTS_DEG[i],
          tilt_min_deg: DEMO_UNIT.tiltRangeDeg[0],
          tilt_max_deg: DEMO_UNIT.tiltRangeDeg[1],
          azimuth_min_deg: DEMO_UNIT.azimuthRangeDeg[0],
          azimuth_max_deg: DEMO_UNIT.azimuthRangeDeg[1],
          plan_x_m: (i % 3) * 6,
          plan_y_m: Math.floor(i / 3) * 5,
          firmware: DEMO_UNIT.firmware,
          device_secret_hash: tools.hashDeviceSecret(deviceSecrets[serial]!),
          engine_secret_hash: tools.engineSecretHash?.(deviceSecrets[serial]!) ?? null,
          weather_station: i === 0 && !s.indoor,
        };
      });
      await trx('units').insert(rows);
    }
    await trx('users').insert(
      DEMO_USERS.map((u) => ({
        email: u.email,
        name: u.name,
        role: u.role,
        owner_id: u.owner ? ownerIds.get(u.owner) : null,
        password_hash: passwordHash,
      })),
    );
  });
  return { seeded: true, deviceSecrets };
}

/**
 * Gives the demo units new random secrets (the simulator's secrets file was lost, or the database predates random demo
 * secrets). Only units with demo serials are touched; returns serial → new secret.
 */
export async function rekeyDemoUnits(db: Knex, tools: DeviceSecretTools): Promise<Record<string, string>> {
  const serials: string[] = await db('units').whereIn('serial', demoSerials()).pluck('serial');
  const secrets: Record<string, string> = {};
  await db.transaction(async (trx) => {
    for (const serial of serials) {
      secrets[serial] = tools.newDeviceSecret();
      await trx('units')
        .where({ serial })
        .update({
          device_secret_hash: tools.hashDeviceSecret(secrets[serial]),
          engine_secret_hash: tools.engineSecretHash?.(secrets[serial]) ?? null,
        });
    }
  });
  return secrets;
}
