import type { Db } from './db';

/** What one server last heard of a unit: arrival and the unit's timestamp [ms]; `offlineMs` when its last word was a last will. */
export interface UnitHeard {
  unitId: number;
  heardMs: number;
  tsMs: number;
  offlineMs: number | null;
}

interface UnitHeardRow {
  unit_id: number;
  heard_at: Date;
  ts: Date;
  offline_at: Date | null;
  written_at: Date;
}

/** Units' last-heard times shared between servers (table `unit_heard`): each server writes what it heard, the comms watch reads all. */
export class UnitHeardRepository {
  constructor(private readonly db: Db) {}

  /**
   * Merges what this server heard: times only move forward, and a last will stands until the unit is heard after it.
   * `offline_at` is assigned first because MariaDB's later assignments see the columns already updated.
   */
  async write(rows: readonly UnitHeard[]): Promise<void> {
    if (!rows.length) return;
    const values = rows.map((r) => [r.unitId, new Date(r.heardMs), new Date(r.tsMs), r.offlineMs === null ? null : new Date(r.offlineMs)]);
    await this.db.raw(
      `INSERT INTO unit_heard (unit_id, heard_at, ts, offline_at, written_at) VALUES ${values.map(() => '(?, ?, ?, ?, NOW(3))').join(', ')}
       ON DUPLICATE KEY UPDATE
         offline_at = CASE
           WHEN VALUES(offline_at) IS NOT NULL AND VALUES(offline_at) >= GREATEST(heard_at, VALUES(heard_at)) THEN VALUES(offline_at)
           WHEN offline_at IS NOT NULL AND VALUES(heard_at) > offline_at THEN NULL
           ELSE offline_at END,
         heard_at = GREATEST(heard_at, VALUES(heard_at)),
         ts = GREATEST(ts, VALUES(ts)),
         written_at = NOW(3)`,
      values.flat(),
    );
  }

  /** Rows written at or after `from` (every row when null), and the newest write time seen (the next read's start). */
  async since(from: Date | null): Promise<{ rows: UnitHeard[]; newestWrite: Date | null }> {
    const q = this.db<UnitHeardRow>('unit_heard').select('unit_id', 'heard_at', 'ts', 'offline_at', 'written_at');
    const rows: UnitHeardRow[] = await (from ? q.where('written_at', '>=', from) : q);
    let newest: Date | null = null;
    for (const r of rows) if (!newest || r.written_at > newest) newest = r.written_at;
    return {
      rows: rows.map((r) => ({
        unitId: r.unit_id,
        heardMs: r.heard_at.getTime(),
        tsMs: r.ts.getTime(),
        offlineMs: r.offline_at ? r.offline_at.getTime() : null,
      })),
      newestWrite: newest,
    };
  }
}
