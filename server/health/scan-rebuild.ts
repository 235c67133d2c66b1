/**
 * Scan and relocate: a scan sweeps the unit over a raster of orientations and reports `[tiltDeg, azimuthDeg, poaWm2]`
 * samples. This rebuilds the measured landscape from them (a tilt × azimuth grid), finds its global maximum (refined
 * between raster points by a parabola through the brightest sample and its neighbours on each axis, at most half a raster
 * step), lists its local maxima, and compares it with the model: the offer is "go to" the measured maximum with the gain
 * over what the unit got before the scan.
 */
import { azimuthDelta, round1 } from './unit-sample';
import { wrap360 } from '../../shared/sphere/directions';

export type ScanSample = readonly [number, number, number];

export interface MeasuredPeak {
  tiltDeg: number;
  azimuthDeg: number;
  wm2: number;
}

export interface ScanLandscape {
  tiltsDeg: number[];
  azimuthsDeg: number[];
  /** Row-major [tilt][azimuth]; null where no sample was taken. */
  values: (number | null)[][];
  samples: number;
  /** Brightest sample. */
  sampleMax: MeasuredPeak;
  /** Refined estimate of the maximum between raster points. */
  globalMax: MeasuredPeak;
  /** Samples brighter than all their raster neighbours (8-neighbourhood), brightest first. */
  localMaxima: MeasuredPeak[];
}

export interface ScanComparison {
  landscape: ScanLandscape;
  /** In-plane irradiance before the scan [W/m²], when known. */
  beforeWm2: number | null;
  expectedGainWm2: number | null;
  expectedGainPct: number | null;
  model: { globalMax: MeasuredPeak; angleApartDeg: number; measuredVsModelPct: number } | null;
  /** The command to send (the engineer confirms it). */
  goto: { kind: 'goto'; tiltDeg: number; azimuthDeg: number };
}

const key = (x: number) => Math.round(x * 100) / 100;

export function rebuildScan(samples: readonly ScanSample[]): ScanLandscape {
  if (samples.length === 0) throw new RangeError('a scan needs at least one sample');
  const tilts = [...new Set(samples.map((s) => key(s[0])))].sort((a, b) => a - b);
  const azs = [...new Set(samples.map((s) => key(wrap360(s[1]))))].sort((a, b) => a - b);
  const values: (number | null)[][] = tilts.map(() => azs.map(() => null));
  for (const [t, a, e] of samples) {
    const i = tilts.indexOf(key(t));
    const j = azs.indexOf(key(wrap360(a)));
    values[i]![j] = Math.max(values[i]![j] ?? -Infinity, e);
  }
  const periodic = azs.length > 2 && 360 - azs[azs.length - 1]! + azs[0]! <= 1.5 * (azs[1]! - azs[0]!);
  const at = (i: number, j: number): number | null => {
    if (i < 0 || i >= tilts.length) return null;
    if (j < 0 || j >= azs.length) {
      if (!periodic) return null;
      j = (j + azs.length) % azs.length;
    }
    return values[i]![j]!;
  };
  let bi = 0;
  let bj = 0;
  for (let i = 0; i < tilts.length; i++)
    for (let j = 0; j < azs.length; j++) if ((values[i]![j] ?? -Infinity) > (values[bi]![bj] ?? -Infinity)) [bi, bj] = [i, j];
  const best = values[bi]![bj]!;
  // Parabolic refinement on each axis where both neighbours exist.
  const refine = (lo: number | null, hi: number | null, step: number) => {
    if (lo === null || hi === null) return { offset: 0, peak: best };
    const den = lo - 2 * best + hi;
    if (den >= 0) return { offset: 0, peak: best };
    const off = Math.max(-0.5, Math.min(0.5, (0.5 * (lo - hi)) / den));
    return { offset: off * step, peak: best - 0.25 * (lo - hi) * off };
  };
  const tStep = tilts.length > 1 ? (bi > 0 ? tilts[bi]! - tilts[bi - 1]! : tilts[bi + 1]! - tilts[bi]!) : 0;
  const aStep = azs.length > 1 ? (bj > 0 ? azs[bj]! - azs[bj - 1]! : azs[bj + 1]! - azs[bj]!) : 0;
  const rt = refine(at(bi - 1, bj), at(bi + 1, bj), tStep);
  const ra = refine(at(bi, bj - 1), at(bi, bj + 1), aStep);
  const localMaxima: MeasuredPeak[] = [];
  for (let i = 0; i < tilts.length; i++) {
    for (let j = 0; j < azs.length; j++) {
      const v = values[i]![j] ?? null;
      if (v === null) continue;
      let top = true;
      for (let di = -1; di <= 1 && top; di++)
        for (let dj = -1; dj <= 1 && top; dj++) {
          if (di === 0 && dj === 0) continue;
          const n = at(i + di, j + dj);
          if (n !== null && n > v) top = false;
        }
      if (top) localMaxima.push({ tiltDeg: tilts[i]!, azimuthDeg: azs[j]!, wm2: v });
    }
  }
  localMaxima.sort((a, b) => b.wm2 - a.wm2);
  return {
    tiltsDeg: tilts,
    azimuthsDeg: azs,
    values,
    samples: samples.length,
    sampleMax: { tiltDeg: tilts[bi]!, azimuthDeg: azs[bj]!, wm2: best },
    globalMax: {
      tiltDeg: round1(Math.max(tilts[0]!, Math.min(tilts[tilts.length - 1]!, tilts[bi]! + rt.offset))),
      azimuthDeg: round1(wrap360(azs[bj]! + ra.offset)),
      wm2: round1(Math.max(rt.peak, ra.peak)),
    },
    localMaxima,
  };
}

/** Angle between two panel normals given as tilt/azimuth [°]. */
export function angleBetweenDeg(a: { tiltDeg: number; azimuthDeg: number }, b: { tiltDeg: number; azimuthDeg: number }): number {
  const r = Math.PI / 180;
  const c =
    Math.cos(a.tiltDeg * r) * Math.cos(b.tiltDeg * r) +
    Math.sin(a.tiltDeg * r) * Math.sin(b.tiltDeg * r) * Math.cos(azimuthDelta(a.azimuthDeg, b.azimuthDeg) * r);
  return Math.acos(Math.max(-1, Math.min(1, c))) / r;
}

export function compareScan(
  samples: readonly ScanSample[],
  beforeWm2: number | null,
  model: { globalMax: MeasuredPeak } | null,
): ScanComparison {
  const landscape = rebuildScan(samples);
  const g = landscape.globalMax;
  const gain = beforeWm2 === null ? null : g.wm2 - beforeWm2;
  return {
    landscape,
    beforeWm2,
    expectedGainWm2: gain === null ? null : round1(gain),
    expectedGainPct: gain === null || !beforeWm2 ? null : round1((gain / beforeWm2) * 100),
    model: model
      ? {
          globalMax: model.globalMax,
          angleApartDeg: round1(angleBetweenDeg(g, model.globalMax)),
          measuredVsModelPct: round1((g.wm2 / model.globalMax.wm2 - 1) * 100),
        }
      : null,
    goto: { kind: 'goto', tiltDeg: Math.max(0, Math.min(90, g.tiltDeg)), azimuthDeg: Math.max(0, Math.min(360, g.azimuthDeg)) },
  };
}
