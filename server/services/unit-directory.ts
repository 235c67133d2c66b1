import type { Db } from '../data/db';

export interface UnitInfo {
  id: number;
  serial: string;
  siteId: number;
  ownerId: number;
  timeZone: string;
  disabled: boolean;
  onHold: boolean;
  detectorTiltDeg: number;
  /** Carries its site's weather station. */
  weatherStation: boolean;
}

/** In-memory map serial → unit, for the hot ingest path. Reloaded periodically and on a miss (at most once a second). */
export class UnitDirectory {
  private bySerial = new Map<string, UnitInfo>();
  private byId = new Map<number, UnitInfo>();
  private lastLoad = 0;
  private loading: Promise<void> | undefined;

  constructor(
    private readonly db: Db,
    private readonly now: () => number = Date.now,
  ) {}

  async load(): Promise<void> {
    this.loading ??= (async () => {
      try {
        const rows = await this.db('units as u')
          .join('sites as s', 's.id', 'u.site_id')
          .select('u.id', 'u.serial', 'u.site_id', 's.owner_id', 's.time_zone', 'u.disabled', 'u.on_hold', 'u.detector_tilt_deg', 'u.weather_station');
        const bySerial = new Map<string, UnitInfo>();
        const byId = new Map<number, UnitInfo>();
        for (const r of rows) {
          const u: UnitInfo = {
            id: r.id, serial: r.serial, siteId: r.site_id, ownerId: r.owner_id, timeZone: r.time_zone,
            disabled: Boolean(r.disabled), onHold: Boolean(r.on_hold), detectorTiltDeg: r.detector_tilt_deg,
            weatherStation: Boolean(r.weather_station),
          };
          bySerial.set(u.serial, u);
          byId.set(u.id, u);
        }
        this.bySerial = bySerial;
        this.byId = byId;
        this.lastLoad = this.now();
      } finally {
        this.loading = undefined;
      }
    })();
    return this.loading;
  }

  /** Known unit by serial; a miss triggers a background reload so a just-registered unit is found moments later. */
  get(serial: string): UnitInfo | undefined {
    const u = this.bySerial.get(serial);
    if (!u && this.now() - this.lastLoad > 1000) void this.load().catch(() => undefined);
    return u;
  }

  byUnitId(id: number): UnitInfo | undefined {
    return this.byId.get(id);
  }

  all(): UnitInfo[] {
    return [...this.byId.values()];
  }

  setHold(unitId: number, onHold: boolean): void {
    const u = this.byId.get(unitId);
    if (u) u.onHold = onHold;
  }
}
