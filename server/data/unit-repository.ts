import type { Db } from './db';
import type { Unit, UnitInput } from '../../shared/contracts/api';
import type { SiteScope } from './site-repository';

interface UnitRow {
  id: number;
  serial: string;
  site_id: number;
  rated_power_wp: number;
  detector_tilt_deg: number;
  tilt_min_deg: number;
  tilt_max_deg: number;
  azimuth_min_deg: number;
  azimuth_max_deg: number;
  plan_x_m: number;
  plan_y_m: number;
  firmware: string;
  disabled: number | boolean;
  device_secret_hash: string;
  engine_secret_hash: string | null;
  on_hold?: number | boolean;
  weather_station?: number | boolean;
}

/** What the in-memory unit directory keeps of each unit (with its site's owner and time zone). */
export interface UnitDirectoryEntry {
  id: number;
  serial: string;
  siteId: number;
  ownerId: number;
  timeZone: string;
  disabled: boolean;
  detectorTiltDeg: number;
  weatherStation: boolean;
}

export class UnitRepository {
  constructor(private readonly db: Db) {}

  private base(scope: SiteScope) {
    const q = this.db('units as u')
      .join('sites as s', 's.id', 'u.site_id')
      .select('u.*', 's.name as site_name', 's.owner_id')
      .orderBy('u.serial');
    if (scope.ownerId !== null) q.where('s.owner_id', scope.ownerId);
    return q;
  }

  async list(scope: SiteScope, siteId?: number): Promise<Unit[]> {
    const q = this.base(scope);
    if (siteId !== undefined) q.where('u.site_id', siteId);
    return (await q).map(toUnit);
  }

  async findById(id: number, scope: SiteScope): Promise<Unit | undefined> {
    const row = await this.base(scope).where('u.id', id).first();
    return row ? toUnit(row) : undefined;
  }

  /** Credentials lookup for the broker: serial → secret hash and whether the unit may connect. */
  async findCredentials(
    serial: string,
  ): Promise<{ id: number; serial: string; siteId: number; deviceSecretHash: string; disabled: boolean } | undefined> {
    const r = await this.db<UnitRow>('units').where({ serial }).first('id', 'serial', 'site_id', 'device_secret_hash', 'disabled');
    return r
      ? { id: r.id, serial: r.serial, siteId: r.site_id, deviceSecretHash: r.device_secret_hash, disabled: Boolean(r.disabled) }
      : undefined;
  }

  /** Every unit with its site's owner and time zone (the unit directory's load). */
  async directory(): Promise<UnitDirectoryEntry[]> {
    const rows = await this.db('units as u')
      .join('sites as s', 's.id', 'u.site_id')
      .select('u.id', 'u.serial', 'u.site_id', 's.owner_id', 's.time_zone', 'u.disabled', 'u.detector_tilt_deg', 'u.weather_station');
    return rows.map((r) => ({
      id: r.id,
      serial: r.serial,
      siteId: r.site_id,
      ownerId: r.owner_id,
      timeZone: r.time_zone,
      disabled: Boolean(r.disabled),
      detectorTiltDeg: r.detector_tilt_deg,
      weatherStation: Boolean(r.weather_station),
    }));
  }

  /** Every enabled unit whose secret the message engine can check (serial, bcrypt hash, site), by serial. */
  async engineCredentials(): Promise<{ serial: string; engineSecretHash: string; siteId: number }[]> {
    const rows: Pick<UnitRow, 'serial' | 'engine_secret_hash' | 'site_id'>[] = await this.db('units')
      .where({ disabled: false })
      .whereNotNull('engine_secret_hash')
      .orderBy('serial')
      .select('serial', 'engine_secret_hash', 'site_id');
    return rows.map((r) => ({ serial: r.serial, engineSecretHash: r.engine_secret_hash!, siteId: r.site_id }));
  }

  async findBySerial(serial: string): Promise<{ id: number } | undefined> {
    return this.db('units').where({ serial }).first('id');
  }

  async insert(unit: UnitInput & { deviceSecretHash: string; engineSecretHash?: string }): Promise<number> {
    const [id] = await this.db('units').insert(unitRow(unit));
    return id as number;
  }

  async update(id: number, patch: Partial<UnitInput> & { deviceSecretHash?: string; engineSecretHash?: string }): Promise<void> {
    const row = unitRow(patch);
    if (Object.keys(row).length) await this.db('units').where({ id }).update(row);
  }
}

/** The columns of the fields given. */
function unitRow(i: Partial<UnitInput> & { deviceSecretHash?: string; engineSecretHash?: string }): Partial<Omit<UnitRow, 'id'>> {
  const map: Record<keyof UnitInput | 'deviceSecretHash' | 'engineSecretHash', string> = {
    serial: 'serial',
    siteId: 'site_id',
    ratedPowerWp: 'rated_power_wp',
    detectorTiltDeg: 'detector_tilt_deg',
    tiltMinDeg: 'tilt_min_deg',
    tiltMaxDeg: 'tilt_max_deg',
    azimuthMinDeg: 'azimuth_min_deg',
    azimuthMaxDeg: 'azimuth_max_deg',
    planXM: 'plan_x_m',
    planYM: 'plan_y_m',
    firmware: 'firmware',
    disabled: 'disabled',
    weatherStation: 'weather_station',
    deviceSecretHash: 'device_secret_hash',
    engineSecretHash: 'engine_secret_hash',
  };
  const r: Record<string, unknown> = {};
  for (const [k, col] of Object.entries(map)) if (i[k as keyof typeof map] !== undefined) r[col] = i[k as keyof typeof map];
  return r;
}

function toUnit(r: UnitRow & { site_name: string }): Unit {
  return {
    id: r.id,
    serial: r.serial,
    siteId: r.site_id,
    siteName: r.site_name,
    ratedPowerWp: r.rated_power_wp,
    detectorTiltDeg: r.detector_tilt_deg,
    tiltMinDeg: r.tilt_min_deg,
    tiltMaxDeg: r.tilt_max_deg,
    azimuthMinDeg: r.azimuth_min_deg,
    azimuthMaxDeg: r.azimuth_max_deg,
    planXM: r.plan_x_m,
    planYM: r.plan_y_m,
    firmware: r.firmware,
    disabled: Boolean(r.disabled),
    weatherStation: Boolean(r.weather_station),
  };
}
