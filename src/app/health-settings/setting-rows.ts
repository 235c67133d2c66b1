import type { SiteHealthSettings } from '../../../shared/contracts/alarms';
import { HEALTH_SETTING_GROUPS, HEALTH_SETTING_WORDS, type HealthSettingGroup } from '../../../shared/contracts/health-setting-words';
import { fieldWords } from '../../../shared/contracts/plain-words';

/** One health setting as the screen shows it: words, numbers and the site's value. */
export interface SettingRow {
  key: string;
  group: HealthSettingGroup | 'Other';
  label: string;
  why: string;
  unit: string;
  min: number;
  max: number;
  integer: boolean;
  defaultValue: number;
  /** The site's override, or null when the default applies. */
  override: number | null;
  effective: number;
}

/** A unit for people: fractions read as "share", others as the server writes them. */
export function unitText(unit: string): string {
  return unit === '(fraction)' ? 'share 0–1' : unit;
}

/** "5–35 m/s", "0–30°", "0.5–0.99 share 0–1". */
export function rangeText(row: Pick<SettingRow, 'min' | 'max' | 'unit'>): string {
  const unit = unitText(row.unit);
  return `${row.min}–${row.max}${unit === '°' ? '°' : ` ${unit}`}`;
}

/** "16 m/s", "0.85 (share 0–1)", "3 units". */
export function valueText(value: number | null, unit: string): string {
  if (value === null) return '—';
  if (unit === '(fraction)') return String(value);
  return unit === '°' ? `${value}°` : `${value} ${unit}`;
}

/** The settings in the server's order, grouped as the words file says (unknown settings last, by their name). */
export function settingRows(s: SiteHealthSettings): SettingRow[] {
  const rows = Object.entries(s.ranges).map(([key, r]): SettingRow => {
    const words = HEALTH_SETTING_WORDS[key];
    const label = words?.label ?? fieldWords(key).replace(/^./, (c) => c.toUpperCase());
    return {
      key,
      group: words?.group ?? 'Other',
      label,
      why: words?.why ?? 'No description yet.',
      unit: r.unit,
      min: r.min,
      max: r.max,
      integer: r.integer === true,
      defaultValue: s.defaults[key] ?? r.min,
      override: typeof s.overrides[key] === 'number' ? s.overrides[key]! : null,
      effective: s.effective[key] ?? s.defaults[key] ?? r.min,
    };
  });
  const order = [...HEALTH_SETTING_GROUPS, 'Other'];
  return rows
    .map((r, i) => ({ r, i }))
    .sort((a, b) => order.indexOf(a.r.group) - order.indexOf(b.r.group) || a.i - b.i)
    .map((x) => x.r);
}

/** The client's own check of a typed value, worded as the server words it; null when it is fine. */
export function valueProblem(row: SettingRow, text: string): string | null {
  const t = text.trim();
  const v = t === '' ? NaN : Number(t);
  if (!Number.isFinite(v)) return `Must be a number (${row.unit}).`;
  if (v < row.min || v > row.max) return `Must be between ${row.min} and ${row.max} ${row.unit}.`;
  if (row.integer && !Number.isInteger(v)) return 'Must be a whole number.';
  return null;
}

/** The overrides a draft stands for: every value that differs from its default (the rest take the default). */
export function overridesOf(rows: readonly SettingRow[], draft: Readonly<Record<string, string>>): Record<string, number> {
  const out: Record<string, number> = {};
  for (const row of rows) {
    const v = Number((draft[row.key] ?? String(row.effective)).trim());
    if (Number.isFinite(v) && v !== row.defaultValue) out[row.key] = v;
  }
  return out;
}

/** Whether two override sets are the same. */
export function sameOverrides(a: Record<string, number>, b: Record<string, number>): boolean {
  const ka = Object.keys(a).sort();
  const kb = Object.keys(b).sort();
  return ka.length === kb.length && ka.every((k, i) => k === kb[i] && a[k] === b[k]);
}
