import type { HoldRepository } from '../data/hold-repository';
import type { UnitRepository } from '../data/unit-repository';
import type { HoldView } from '../../shared/contracts/holds';
import type { UnitRef } from '../health/unit-sample';

export interface UnitInfo {
  id: number;
  serial: string;
  siteId: number;
  ownerId: number;
  timeZone: string;
  disabled: boolean;
  /** Whether any maintenance hold is in force (`holds` is not empty). */
  onHold: boolean;
  /** The holds in force, oldest first. */
  holds: HoldView[];
  detectorTiltDeg: number;
  /** Carries its site's weather station. */
  weatherStation: boolean;
}

/**
 * In-memory map serial → unit, for the hot ingest path and for who may see which unit. Loaded at start, reloaded at once
 * when an admin changes a unit or a site (`load()` after the change), and on an unknown serial (at most once a second).
 */
export class UnitDirectory {
  private bySerial = new Map<string, UnitInfo>();
  private byId = new Map<number, UnitInfo>();
  private lastLoad = 0;
  private running: Promise<void> | undefined;
  private again: Promise<void> | undefined;
  /** Counts hold changes; a load that started before a unit's latest change keeps that unit's newer holds. */
  private holdChanges = 0;
  private readonly holdChangedAt = new Map<number, number>();

  constructor(
    private readonly unitRepo: Pick<UnitRepository, 'directory'>,
    private readonly holdRepo: Pick<HoldRepository, 'allActive'>,
    private readonly now: () => number = Date.now,
  ) {}

  /**
   * Reloads every unit. Resolves once a load that started after this call has finished, so a caller that has just
   * changed a unit sees the change (a load already running may have read the rows before it).
   */
  load(): Promise<void> {
    if (!this.running) {
      this.running = this.read().finally(() => {
        this.running = undefined;
      });
      return this.running;
    }
    this.again ??= this.running
      .catch(() => undefined)
      .then(() => {
        this.again = undefined;
        return this.load();
      });
    return this.again;
  }

  private async read(): Promise<void> {
    const changesAtStart = this.holdChanges;
    const rows = await this.unitRepo.directory();
    const holds = new Map<number, HoldView[]>();
    for (const h of await this.holdRepo.allActive()) holds.set(h.unitId, [...(holds.get(h.unitId) ?? []), h]);
    const bySerial = new Map<string, UnitInfo>();
    const byId = new Map<number, UnitInfo>();
    for (const r of rows) {
      const current = this.byId.get(r.id);
      const unitHolds = current && (this.holdChangedAt.get(r.id) ?? 0) > changesAtStart ? current.holds : (holds.get(r.id) ?? []);
      const u: UnitInfo = { ...r, onHold: unitHolds.length > 0, holds: unitHolds };
      bySerial.set(u.serial, u);
      byId.set(u.id, u);
    }
    this.bySerial = bySerial;
    this.byId = byId;
    this.lastLoad = this.now();
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

  /** The unit's holds in force changed (as just committed). */
  setHolds(unitId: number, holds: HoldView[]): void {
    this.holdChangedAt.set(unitId, ++this.holdChanges);
    const u = this.byId.get(unitId);
    if (u) {
      u.holds = holds;
      u.onHold = holds.length > 0;
    }
  }
}

/** What the health detectors know of a unit. */
export const unitRefOf = (u: UnitInfo): UnitRef => ({
  unitId: u.id,
  serial: u.serial,
  siteId: u.siteId,
  detectorTiltDeg: u.detectorTiltDeg,
  onHold: u.onHold,
});
