import type { Logger } from 'pino';
import type { HealthSettingsChange, HealthSettingsHistory } from '../../shared/contracts/alarms';
import type { AuditRepository } from '../data/audit-repository';
import type { HealthSettingsRepository, StoredOverrides } from '../data/health-settings-repository';
import {
  resolveHealthSettings,
  sanitizeStoredOverrides,
  DEFAULT_HEALTH_SETTINGS,
  HEALTH_SETTING_RANGES,
  type HealthSettings,
  type HealthSettingsOverride,
} from '../health/health-settings';
import type { AdminService } from './admin-service';
import type { Caller } from './caller';

/** The audit action of a saved change of a site's health settings. */
export const HEALTH_SETTINGS_ACTION = 'health-settings-update';

const detailOf = (d: unknown): Record<string, unknown> => (d && typeof d === 'object' ? (d as Record<string, unknown>) : {});
const overridesOf = (v: unknown): Record<string, unknown> => (v && typeof v === 'object' ? (v as Record<string, unknown>) : {});
const numberOrNull = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);

/** The overrides that differ between `before` and `after` of an audit entry, in the order of the settings' table. */
function changesOf(detail: Record<string, unknown>): HealthSettingsChange['changes'] {
  const before = overridesOf(detail.before);
  const after = overridesOf(detail.after);
  const order = Object.keys(HEALTH_SETTING_RANGES);
  const keys = [...new Set([...Object.keys(before), ...Object.keys(after)])].sort(
    (a, b) => (order.indexOf(a) + 1 || Infinity) - (order.indexOf(b) + 1 || Infinity) || a.localeCompare(b),
  );
  return keys.map((key) => ({ key, from: numberOrNull(before[key]), to: numberOrNull(after[key]) })).filter((c) => c.from !== c.to);
}

export interface SiteHealthSettings {
  defaults: HealthSettings;
  overrides: Partial<HealthSettings>;
  effective: HealthSettings;
  ranges: typeof HEALTH_SETTING_RANGES;
}

/** Per-site health settings: the engine reads the effective values from memory; engineers change the overrides. */
export class HealthSettingsService {
  private readonly settings = new Map<number, HealthSettings>();

  constructor(
    private readonly repo: HealthSettingsRepository,
    private readonly admin: AdminService,
    private readonly log: Logger,
    private readonly now: () => number,
    private readonly audit: AuditRepository,
  ) {}

  /** Reads every site's overrides (at start). */
  async load(): Promise<void> {
    for (const [siteId, o] of await this.repo.allSettings()) this.settings.set(siteId, resolveHealthSettings(this.stored(siteId, o)));
  }

  /** The effective settings of a site. */
  forSite(siteId: number): HealthSettings {
    return this.settings.get(siteId) ?? DEFAULT_HEALTH_SETTINGS;
  }

  async siteSettings(c: Caller, siteId: number): Promise<SiteHealthSettings> {
    await this.admin.getSite(c, siteId);
    const overrides = this.stored(siteId, await this.repo.settings(siteId));
    return {
      defaults: { ...DEFAULT_HEALTH_SETTINGS },
      overrides,
      effective: resolveHealthSettings(overrides),
      ranges: HEALTH_SETTING_RANGES,
    };
  }

  /** Replaces a site's overrides (already validated against the ranges); the reason goes to the audit log with them. */
  async saveSiteSettings(c: Caller, siteId: number, override: HealthSettingsOverride, reason: string): Promise<SiteHealthSettings> {
    await this.admin.getSite(c, siteId);
    const overrides = Object.fromEntries(Object.entries(override).filter(([, v]) => v !== undefined)) as Record<string, number>;
    await this.repo.saveSettings(siteId, overrides, c.id, new Date(this.now()), (before) => ({
      action: HEALTH_SETTINGS_ACTION,
      target: `site:${siteId}`,
      detail: { before: before ?? {}, after: overrides, reason },
    }));
    this.settings.set(siteId, resolveHealthSettings(overrides));
    return this.siteSettings(c, siteId);
  }

  /**
   * The site's saved changes, newest first, from the audit log: who, when, why, and each override before → after (null
   * for the default). Entries that changed nothing (the same overrides saved again) stay, with no changes, so the
   * history shows every save.
   */
  async history(c: Caller, siteId: number, limit: number): Promise<HealthSettingsHistory> {
    await this.admin.getSite(c, siteId);
    const { total, rows } = await this.audit.list({ action: HEALTH_SETTINGS_ACTION, target: `site:${siteId}` }, limit, 0);
    return {
      siteId,
      total,
      entries: rows.map((r): HealthSettingsChange => ({
        at: r.at.toISOString(),
        by: r.userId === null ? null : { id: r.userId, name: r.userName ?? `Person ${r.userId} (no longer exists)` },
        reason: typeof detailOf(r.detail).reason === 'string' ? (detailOf(r.detail).reason as string) : null,
        changes: changesOf(detailOf(r.detail)),
      })),
    };
  }

  /** Stored overrides within their ranges; anything else (written before the ranges existed) falls back to its default. */
  private stored(siteId: number, overrides: StoredOverrides | null): HealthSettingsOverride {
    return sanitizeStoredOverrides(overrides, (key, value) =>
      this.log.warn({ siteId, key, value }, 'stored health setting out of range: its default applies'),
    );
  }
}
