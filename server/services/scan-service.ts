import type { HealthReadRepository } from '../data/health-read-repository';
import { notFound } from '../errors/app-error';
import { compareScan, type ScanComparison, type ScanSample } from '../health/scan-rebuild';
import type { AdminService } from './admin-service';
import type { Caller } from './caller';
import type { SiteModelCache } from './site-model-cache';
import type { UnitDirectory } from './unit-directory';

export type ScanResultView = ScanComparison & { commandId: string; startedAt: string; completedAt: string | null; complete: boolean };

/** A unit's scan rebuilt from its stored events and compared with the site's model. */
export class ScanService {
  constructor(
    private readonly reads: HealthReadRepository,
    private readonly admin: AdminService,
    private readonly units: UnitDirectory,
    private readonly models: SiteModelCache,
  ) {}

  /** The unit's latest (or a given) scan rebuilt and compared with the model. */
  async scanResult(c: Caller, unitId: number, commandId?: string): Promise<ScanResultView> {
    const unit = await this.admin.getUnit(c, unitId);
    const events = await this.reads.scanEvents(unit.id, commandId);
    const samples: ScanSample[] = [];
    let done: Date | null = null;
    let id = commandId ?? '';
    for (const e of events) {
      id ||= e.body.commandId ?? '';
      if (e.kind === 'scan-samples') samples.push(...(e.body.samples ?? []));
      if (e.kind === 'scan-complete') done = new Date(e.ts);
    }
    if (!samples.length) throw notFound('Scan');
    const started = new Date(events[0]!.ts);
    const before = await this.reads.poaBefore(unit.id, started);
    const info = this.units.byUnitId(unit.id);
    let model: { globalMax: { tiltDeg: number; azimuthDeg: number; wm2: number } } | null = null;
    if (info) {
      const globalMax = await this.models.globalMaxAt(info.siteId, (done ?? started).getTime()).catch(() => null);
      if (globalMax) model = { globalMax };
    }
    return {
      commandId: id,
      startedAt: started.toISOString(),
      completedAt: done ? (done as Date).toISOString() : null,
      complete: done !== null,
      ...compareScan(samples, before, model),
    };
  }
}
