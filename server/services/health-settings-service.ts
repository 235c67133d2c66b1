import type { Logger } from 'pino';
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
    private readonly admin: Pick<AdminService, 'getSite'>,
    private readonly log: Logger,
    private readonly now: () => number,
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

  /** Replaces a site's overrides (already validated against the ranges). */
  async saveSiteSettings(c: Caller, siteId: number, override: HealthSettingsOverride): Promise<SiteHealthSettings> {
    await this.admin.getSite(c, siteId);
    const overrides = Object.fromEntries(Object.entries(override).filter(([, v]) => v !== undefined)) as Record<string, number>;
    await this.repo.saveSettings(siteId, overrides, c.id, new Date(this.now()), (before) => ({
      action: 'health-settings-update',
      target: `site:${siteId}`,
      detail: { before: before ?? {}, after: overrides },
    }));
    this.settings.set(siteId, resolveHealthSettings(overrides));
    return this.siteSettings(c, siteId);
  }

  /** Stored overrides within their ranges; anything else (written before the ranges existed) falls back to its default. */
  private stored(siteId: number, overrides: StoredOverrides | null): HealthSettingsOverride {
    return sanitizeStoredOverrides(overrides, (key, value) =>
      this.log.warn({ siteId, key, value }, 'stored health setting out of range: its default applies'),
    );
  }
}
