import { describe, expect, it } from 'vitest';
import {
  DEFAULT_HEALTH_SETTINGS,
  HEALTH_SETTING_RANGES,
  healthSettingsOverrideSchema,
  sanitizeStoredOverrides,
  type HealthSettings,
} from '../../server/health/health-settings';

const keys = Object.keys(DEFAULT_HEALTH_SETTINGS) as (keyof HealthSettings)[];
const fieldsOf = (body: unknown): Record<string, string> => {
  const r = healthSettingsOverrideSchema.safeParse(body);
  if (r.success) return {};
  return Object.fromEntries(r.error.issues.map((i) => [i.path.join('.'), i.message]));
};

describe('health setting ranges', () => {
  it('gives every setting a range with a unit, and every default lies inside its range', () => {
    expect(Object.keys(HEALTH_SETTING_RANGES).sort()).toEqual([...keys].sort());
    for (const k of keys) {
      const r = HEALTH_SETTING_RANGES[k];
      expect(r.min, k).toBeLessThan(r.max);
      expect(Number.isFinite(r.max), k).toBe(true);
      expect(r.unit.length, k).toBeGreaterThan(0);
      expect(DEFAULT_HEALTH_SETTINGS[k], k).toBeGreaterThanOrEqual(r.min);
      expect(DEFAULT_HEALTH_SETTINGS[k], k).toBeLessThanOrEqual(r.max);
    }
    expect(healthSettingsOverrideSchema.safeParse({ ...DEFAULT_HEALTH_SETTINGS }).success).toBe(true);
  });

  it('refuses a stow gust limit of 1e300 m/s, which would silently disable the not-stowed alarm', () => {
    expect(fieldsOf({ stowGustMs: 1e300 })).toEqual({ stowGustMs: 'Must be between 5 and 35 m/s.' });
  });

  it('refuses each setting just above its maximum and just below its minimum, naming the field and its range', () => {
    for (const k of keys) {
      const r = HEALTH_SETTING_RANGES[k];
      const step = r.integer ? 1 : Math.max(1e-6, (r.max - r.min) * 0.01);
      const message = `Must be between ${r.min} and ${r.max} ${r.unit}.`;
      expect(fieldsOf({ [k]: r.max + step })[k], `${k} above`).toBe(message);
      expect(fieldsOf({ [k]: r.min - step })[k], `${k} below`).toBe(message);
      // The ends themselves are allowed (a hysteresis pair may still object to the combination with a default).
      expect(fieldsOf({ [k]: r.max })[k], `${k} at max`).not.toBe(message);
      expect(fieldsOf({ [k]: r.min })[k], `${k} at min`).not.toBe(message);
    }
  });

  it('keeps the physical meaning: wind in m/s up to a storm, fractions within 0…1, a negative temperature coefficient', () => {
    expect(HEALTH_SETTING_RANGES.stowGustMs).toMatchObject({ min: 5, max: 35, unit: 'm/s' });
    expect(HEALTH_SETTING_RANGES.powerTempCoeffPerK.max).toBeLessThanOrEqual(0);
    for (const k of [
      'trapRatio',
      'trapPeerRatio',
      'trapClearRatio',
      'driftTolerance',
      'siteDarkFraction',
      'huntingSiteShare',
      'soilingLossThreshold',
    ] as const) {
      expect(HEALTH_SETTING_RANGES[k].min, k).toBeGreaterThanOrEqual(0);
      expect(HEALTH_SETTING_RANGES[k].max, k).toBeLessThanOrEqual(1);
    }
    expect(fieldsOf({ stowTiltDeg: 90 })).toEqual({ stowTiltDeg: 'Must be between 0 and 15 °.' });
    expect(fieldsOf({ trapManyUnits: 2.5 })).toEqual({ trapManyUnits: 'Must be a whole number.' });
  });

  it('refuses hysteresis the wrong way round (a clear threshold past the raise threshold), judged against the defaults too', () => {
    expect(fieldsOf({ trapRatio: 0.9, trapClearRatio: 0.85 })).toEqual({ trapClearRatio: 'Must be at least trapRatio (0.9).' });
    expect(fieldsOf({ trapRatio: 0.9 })).toEqual({ trapClearRatio: 'Must be at least trapRatio (0.9).' });
    expect(fieldsOf({ driftClearTolerance: 0.08 })).toEqual({ driftClearTolerance: 'Must be at most driftTolerance (0.06).' });
    expect(fieldsOf({ soilingClearLoss: 0.05 })).toEqual({ soilingClearLoss: 'Must be at most soilingLossThreshold (0.04).' });
    expect(fieldsOf({ trapRatio: 0.9, trapClearRatio: 0.92 })).toEqual({});
  });

  it('drops stored overrides that are out of range (stored before the ranges existed), keeping the rest', () => {
    const warned: string[] = [];
    expect(sanitizeStoredOverrides({ stowGustMs: 1e300, trapRatio: 0.8, nonsense: 3 }, (k) => warned.push(k))).toEqual({ trapRatio: 0.8 });
    expect(warned.sort()).toEqual(['nonsense', 'stowGustMs']);
  });
});
