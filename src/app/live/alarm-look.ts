import type { AlarmSeverity, AlarmView, OrientationPeak } from '../../../shared/contracts/alarms';
import { alarmKindWords, detectorWords } from '../../../shared/contracts/plain-words';

/**
 * How a severity is shown: always the code, a word and an icon; the class (`sev-p1` …) repeats them in colour and
 * outline. Every severity has its own icon, colour and outline (styles.scss), so none depends on colour alone.
 */
export interface SeverityLook {
  code: string;
  label: string;
  icon: string;
  /** CSS class carrying the colour. */
  cssClass: string;
  /** 0 = most urgent. */
  rank: number;
}

const SEVERITY: Record<AlarmSeverity, Omit<SeverityLook, 'code'>> = {
  P1: { label: 'Urgent', icon: 'release_alert', cssClass: 'sev-p1', rank: 0 },
  P2: { label: 'High', icon: 'warning', cssClass: 'sev-p2', rank: 1 },
  P3: { label: 'Medium', icon: 'report', cssClass: 'sev-p3', rank: 2 },
  P4: { label: 'Low', icon: 'info', cssClass: 'sev-p4', rank: 3 },
};

export function severityLook(severity: string | null | undefined): SeverityLook {
  const s = (SEVERITY as Partial<Record<string, Omit<SeverityLook, 'code'>>>)[severity ?? ''];
  return s ? { code: severity!, ...s } : { code: severity ?? '?', label: 'Unknown', icon: 'help', cssClass: 'sev-p4', rank: 4 };
}

/** Plain names of alarm kinds (the one map in shared/contracts/plain-words.ts); unknown kinds are shown as sent, with dashes as spaces. */
export const alarmKindLabel = alarmKindWords;

const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);
const obj = (v: unknown): Record<string, unknown> | null =>
  v && typeof v === 'object' && !Array.isArray(v) ? (v as Record<string, unknown>) : null;

/** In-plane irradiance the alarm says is lost [W/m²], when the evidence has it (traps). */
export function atRiskWm2(a: AlarmView): number | null {
  return num(a.evidence?.['lossWm2']);
}

/** Open alarms first; then most urgent; then most irradiance at risk; then seen first longest ago. */
export function compareAlarms(a: AlarmView, b: AlarmView): number {
  const open = (x: AlarmView) => (x.state === 'cleared' ? 1 : 0);
  return (
    open(a) - open(b) ||
    severityLook(a.severity).rank - severityLook(b.severity).rank ||
    (atRiskWm2(b) ?? -1) - (atRiskWm2(a) ?? -1) ||
    Date.parse(a.firstSeenAt) - Date.parse(b.firstSeenAt) ||
    a.id - b.id
  );
}

export function sortAlarms(list: readonly AlarmView[]): AlarmView[] {
  return [...list].sort(compareAlarms);
}

export interface AlarmListFilter {
  siteId: number | null;
  kind: string | null;
  /** 'open' = active; 'unacknowledged' = active and not acknowledged. */
  state: 'open' | 'unacknowledged' | 'cleared' | 'all';
}

export function filterAlarms(list: readonly AlarmView[], f: AlarmListFilter): AlarmView[] {
  return list.filter(
    (a) =>
      (f.siteId === null || a.siteId === f.siteId) &&
      (f.kind === null || a.kind === f.kind) &&
      (f.state === 'all' ||
        (f.state === 'open' && a.state !== 'cleared') ||
        (f.state === 'unacknowledged' && a.state !== 'cleared' && !a.acknowledgedAt) ||
        (f.state === 'cleared' && a.state === 'cleared')),
  );
}

/** Applies a live update: replaces the alarm with the same id, or adds it. */
export function upsertAlarm(list: readonly AlarmView[], a: AlarmView): AlarmView[] {
  return [...list.filter((x) => x.id !== a.id), a];
}

/** Most urgent open alarm of a list, or null. */
export function worstOpen(list: readonly AlarmView[]): AlarmView | null {
  return sortAlarms(list.filter((a) => a.state !== 'cleared'))[0] ?? null;
}

const r1 = (x: number) => Math.round(x * 10) / 10;

/** What the drift detector found about one detector, in words. */
const FINDING_WORDS: Partial<Record<string, string>> = {
  drifting: 'drifting',
  dead: 'dead or disconnected',
  saturated: 'reads at full scale',
};

/** A few labelled facts from the evidence, worded for people; unknown shapes give what they can. */
export function evidenceSummary(a: AlarmView): { label: string; value: string }[] {
  const e = a.evidence ?? {};
  const out: { label: string; value: string }[] = [];
  const readings = obj(e['readings']);
  const poa = num(readings?.['poaWm2']);
  const tilt = num(readings?.['tiltDeg']);
  const az = num(readings?.['azimuthDeg']);
  if (tilt !== null && az !== null) out.push({ label: 'Pointing', value: `tilt ${r1(tilt)}°, azimuth ${r1(az)}°` });
  if (poa !== null) out.push({ label: 'In-plane', value: `${Math.round(poa)} W/m²` });
  const trap = trapFinding(a);
  if (trap) {
    out.push({
      label: 'Modelled brightest',
      value: `${Math.round(trap.best.wm2)} W/m² at tilt ${r1(trap.best.tiltDeg)}°, azimuth ${r1(trap.best.azimuthDeg)}°`,
    });
    if (trap.lossWm2 !== null)
      out.push({ label: 'Lost', value: `${Math.round(trap.lossWm2)} W/m²${trap.lossPct !== null ? ` (${r1(trap.lossPct)} %)` : ''}` });
    if (trap.peaks !== null) out.push({ label: 'Peaks in the model', value: String(trap.peaks) });
  } else {
    const lossPct = num(e['lossPct']);
    if (lossPct !== null) out.push({ label: 'Loss', value: `${r1(lossPct)} %` });
  }
  const axes = e['axes'];
  if (Array.isArray(axes) && axes.length) out.push({ label: 'Stalled axes', value: axes.map(String).join(', ') });
  if (typeof e['detector'] === 'string')
    out.push({
      label: 'Detector',
      value: `${detectorWords(e['detector'])}${typeof e['finding'] === 'string' ? ` (${FINDING_WORDS[e['finding']] ?? 'suspect'})` : ''}`,
    });
  const rev = num(e['reversalsPerHour']);
  if (rev !== null) out.push({ label: 'Reversals', value: `${Math.round(rev)} per hour` });
  const gust = num(e['peakGustMs']);
  if (gust !== null) out.push({ label: 'Peak gust', value: `${r1(gust)} m/s` });
  const silent = e['silentUnits'];
  if (Array.isArray(silent)) out.push({ label: 'Silent units', value: `${silent.length} of ${num(e['units']) ?? '?'}` });
  return out;
}

/** What a trap alarm says about the better orientation and the loss (from its evidence). */
export interface TrapFinding {
  best: OrientationPeak;
  /** In-plane irradiance the model expects where the unit points [W/m²]. */
  modelledHereWm2: number | null;
  lossWm2: number | null;
  lossPct: number | null;
  /** Local maxima in the modelled landscape. */
  peaks: number | null;
  /** Smallest detector tilt that leaves one peak [°]; null when none up to the search limit. */
  singlePeakDetectorTiltDeg: number | null;
  detectorTiltDeg: number | null;
}

export function trapFinding(a: AlarmView): TrapFinding | null {
  if (a.kind !== 'trap') return null;
  const model = obj(a.evidence?.['model']);
  const g = obj(model?.['globalMax']);
  const tilt = num(g?.['tiltDeg']);
  const az = num(g?.['azimuthDeg']);
  const wm2 = num(g?.['wm2']);
  if (tilt === null || az === null || wm2 === null) return null;
  const lm = model?.['localMaxima'];
  return {
    best: { tiltDeg: tilt, azimuthDeg: az, wm2 },
    modelledHereWm2: num(model?.['modelledHereWm2']),
    lossWm2: num(a.evidence['lossWm2']),
    lossPct: num(a.evidence['lossPct']),
    peaks: Array.isArray(lm) ? lm.length : null,
    singlePeakDetectorTiltDeg: num(model?.['minSinglePeakDetectorTiltDeg']),
    detectorTiltDeg: num(a.evidence['detectorTiltDeg']),
  };
}

/** Trace explorer query around an alarm: from 30 min before it was first seen to 30 min after it was last seen (or cleared). */
export function traceQuery(a: AlarmView, nowMs: number): { units: number; from: string; to: string } | null {
  if (a.unitId === null) return null;
  const pad = 30 * 60_000;
  const from = Date.parse(a.firstSeenAt) - pad;
  const end = Date.parse(a.clearedAt ?? a.lastSeenAt) + pad;
  return { units: a.unitId, from: new Date(from).toISOString(), to: new Date(Math.min(end, Math.max(nowMs, from + pad))).toISOString() };
}
