import type { UnitLiveState } from '../../../shared/contracts/live';
import { UNIT_MODE_WORDS } from '../../../shared/contracts/plain-words';
import type { UnitMode } from '../../../shared/contracts/wire-format';

/** Tone of a state; each tone has a colour, but the word and icon always say the same thing. */
export type Tone = 'good' | 'busy' | 'caution' | 'problem' | 'stopped';

export interface StatusLook {
  /** Short word(s) for the state. */
  label: string;
  /** Material Symbols ligature. */
  icon: string;
  tone: Tone;
  /** One sentence for a tooltip or screen reader. */
  hint: string;
}

/** The words of each tone when it groups units (fleet board chips, site plan legend): one name per group everywhere. */
export const TONE_WORDS: Record<Tone, string> = {
  problem: 'Needs attention',
  caution: 'Held or stowed',
  busy: 'Tracking or scanning',
  good: 'Settled',
  stopped: 'Never reported',
};

/** Each mode's look; its label is the mode's one name (shared/contracts/plain-words.ts). */
const MODE_LOOK: Record<UnitMode, StatusLook> = {
  seeking: {
    label: UNIT_MODE_WORDS.seeking.label,
    icon: 'trending_up',
    tone: 'busy',
    hint: 'Moving toward brighter light along its detector pairs.',
  },
  settled: { label: UNIT_MODE_WORDS.settled.label, icon: 'check_circle', tone: 'good', hint: 'Detector pairs balanced; holding position.' },
  scanning: { label: UNIT_MODE_WORDS.scanning.label, icon: 'radar', tone: 'busy', hint: 'Sweeping its range to map the sky.' },
  stowed: { label: UNIT_MODE_WORDS.stowed.label, icon: 'shield', tone: 'caution', hint: 'In its safe position (wind or command).' },
  held: {
    label: UNIT_MODE_WORDS.held.label,
    icon: 'front_hand',
    tone: 'caution',
    hint: 'Held for work on site: motion commands are refused.',
  },
  fault: { label: UNIT_MODE_WORDS.fault.label, icon: 'error', tone: 'problem', hint: 'The unit reports a fault.' },
};

/** How a unit's live state is shown: offline and hold win over the reported mode. */
export function statusLook(s: Pick<UnitLiveState, 'online' | 'mode' | 'onHold' | 'lastReportAt'> | null | undefined): StatusLook {
  if (!s || (!s.lastReportAt && !s.online))
    return {
      label: TONE_WORDS.stopped,
      icon: 'hourglass_empty',
      tone: 'stopped',
      hint: 'The unit has not reported since the server started.',
    };
  if (!s.online)
    return { label: 'Offline', icon: 'cloud_off', tone: 'problem', hint: 'No connection to the unit; values are its last report.' };
  if (s.onHold && s.mode !== 'held') return MODE_LOOK.held;
  return s.mode ? MODE_LOOK[s.mode] : { label: 'Online', icon: 'cloud_done', tone: 'good', hint: 'Connected; no mode reported yet.' };
}

/** Order used when sorting by state: most urgent first. */
export function statusRank(look: StatusLook): number {
  return { problem: 0, caution: 1, busy: 2, stopped: 3, good: 4 }[look.tone];
}

/**
 * Shortfall of a unit's in-plane irradiance against the modelled best orientation [%]: 0 at the best,
 * 100 when dark. null without both values or when the modelled best is too small to compare (night).
 */
export function shortfallPercent(poaWm2: number | null | undefined, bestWm2: number | null | undefined): number | null {
  if (poaWm2 === null || poaWm2 === undefined || bestWm2 === null || bestWm2 === undefined || bestWm2 < 50) return null;
  return Math.max(0, Math.round((1 - poaWm2 / bestWm2) * 100));
}

const zoneFormats = new Map<string, Intl.DateTimeFormat>();

/** Site-local time with its zone abbreviation, e.g. "14:05:09 CEST" (or with the date when `withDate`). */
export function siteTime(iso: string | number | null | undefined, timeZone: string, withDate = false): string {
  if (iso === null || iso === undefined) return '—';
  const key = `${timeZone}|${withDate}`;
  let f = zoneFormats.get(key);
  if (!f) {
    f = new Intl.DateTimeFormat('en-GB', {
      timeZone,
      ...(withDate ? { year: 'numeric', month: 'short', day: 'numeric' } : {}),
      hour: '2-digit',
      minute: '2-digit',
      second: '2-digit',
      hour12: false,
      timeZoneName: 'short',
    });
    zoneFormats.set(key, f);
  }
  return f.format(typeof iso === 'number' ? iso : Date.parse(iso));
}

/** The same instant in UTC (for tooltips), e.g. "2026-06-21 12:05:09 UTC". */
export function utcTime(iso: string | number | null | undefined): string {
  if (iso === null || iso === undefined) return '';
  const d = new Date(typeof iso === 'number' ? iso : Date.parse(iso));
  return `${d.toISOString().slice(0, 19).replace('T', ' ')} UTC`;
}

/** "12 s ago", "5 min ago", "3 h ago" from an instant to now. */
export function ago(iso: string | null | undefined, now = Date.now()): string {
  if (!iso) return 'never';
  const s = Math.max(0, Math.round((now - Date.parse(iso)) / 1000));
  if (s < 60) return `${s} s ago`;
  if (s < 3600) return `${Math.round(s / 60)} min ago`;
  if (s < 86_400) return `${Math.round(s / 3600)} h ago`;
  return `${Math.round(s / 86_400)} d ago`;
}

/** A value with its unit, or an em dash when missing. */
export function withUnit(v: number | null | undefined, unit: string, digits = 0): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return '—';
  return `${v.toLocaleString('en-GB', { minimumFractionDigits: digits, maximumFractionDigits: digits })} ${unit}`;
}
