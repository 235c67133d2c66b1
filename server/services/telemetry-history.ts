import type { TelemetryRepository, TelemetryRow } from '../data/telemetry-repository';

/** Most raw reports one request returns. */
const RECENT_MAX_ROWS = 20_000;

/** A unit's stored raw reports over a range (the caller's access to the unit is checked before). */
export class TelemetryHistory {
  constructor(private readonly repo: Pick<TelemetryRepository, 'recent'>) {}

  /** Raw reports in time order, as stored (the API serves the stored row: see `src/app/live/fleet-api.ts`). */
  recent(unitId: number, from: Date, to: Date): Promise<TelemetryRow[]> {
    return this.repo.recent(unitId, from, to, RECENT_MAX_ROWS);
  }
}
