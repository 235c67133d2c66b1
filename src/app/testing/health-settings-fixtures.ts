import type { SiteHealthSettings } from '../../../shared/contracts/alarms';

/** Three settings as the server sends them (their real defaults and ranges); `overrides` changes the site's values. */
export function siteSettings(overrides: Record<string, number> = {}): SiteHealthSettings {
  const defaults = { trapRatio: 0.85, trapManyUnits: 3, stowGustMs: 18 };
  return {
    defaults,
    overrides,
    effective: { ...defaults, ...overrides },
    ranges: {
      trapRatio: { min: 0.5, max: 0.99, unit: '(fraction)' },
      trapManyUnits: { min: 1, max: 500, unit: 'units', integer: true },
      stowGustMs: { min: 5, max: 35, unit: 'm/s' },
    },
  };
}
