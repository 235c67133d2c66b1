import type { Db } from './db';
import { appendAudit, type AuditEntry } from './audit-repository';

/** Stored per-site health-setting overrides (JSON as written; validated by the reader). */
export type StoredOverrides = Record<string, unknown>;

/** Per-site overrides of the health settings. */
export class HealthSettingsRepository {
  constructor(private readonly db: Db) {}

  async settings(siteId: number): Promise<StoredOverrides | null> {
    const r = await this.db('site_health_settings').where({ site_id: siteId }).first('settings');
    if (!r) return null;
    return typeof r.settings === 'string' ? JSON.parse(r.settings) : r.settings;
  }

  async allSettings(): Promise<Map<number, StoredOverrides>> {
    const rows = await this.db('site_health_settings').select('site_id', 'settings');
    return new Map(rows.map((r) => [r.site_id as number, typeof r.settings === 'string' ? JSON.parse(r.settings) : r.settings]));
  }

  /**
   * Replaces a site's overrides and writes the audit entry in the same transaction; `audit` is given the overrides
   * being replaced (read under a row lock, so two saves at once each see what they replace).
   */
  async saveSettings(
    siteId: number,
    settings: Record<string, number>,
    userId: number,
    at: Date,
    audit: (before: StoredOverrides | null) => Omit<AuditEntry, 'userId'>,
  ): Promise<void> {
    await this.db.transaction(async (trx) => {
      // Lock the site's row (it always exists): locking a settings row that is not there yet takes a gap lock, and two
      // first saves of one site at once would then deadlock on their inserts.
      await trx('sites').where({ id: siteId }).forUpdate().first('id');
      const r = await trx('site_health_settings').where({ site_id: siteId }).first('settings');
      const before = r ? (typeof r.settings === 'string' ? JSON.parse(r.settings) : r.settings) : null;
      await trx('site_health_settings')
        .insert({ site_id: siteId, settings: JSON.stringify(settings), updated_by: userId, updated_at: at })
        .onConflict('site_id')
        .merge();
      await appendAudit(trx, { ...audit(before), userId });
    });
  }
}
