/**
 * Detector-pair model of a self-orienting unit.
 *
 * Each unit carries two pairs of photodetectors tilted ±δ from the panel normal n: one pair in the tilt plane
 * (normals n cos δ ± t sin δ, t = ∂n/∂tilt) and one pair sideways, in the azimuth direction
 * (n cos δ ± u sin δ, u = horizontal unit vector toward increasing azimuth). The photodifferentials are
 * P_tilt = E(+) − E(−) and P_azimuth = E(+) − E(−). Along one great circle P = ∫_{α−δ}^{α+δ} E′ = 2δ · (box-filtered E)′,
 * so a unit climbing its differentials climbs the landscape box-filtered over ±δ: the blurred landscape here is that
 * box average taken along the tilt great circle and then along the sideways great circle (separable).
 * Identities (derived from Lambert's law): beam only, P = −2·DNI·sin α·sin δ (α = angle off the sun in the plane of
 * motion); isotropic sky, P_tilt = −D·sin β·sin δ; ground adds +ρG·sin β·sin δ.
 */
import { normalFromTiltAzimuth, tiltAzimuthOf, type Vec3 } from '../sphere/directions';
import type { Landscape } from './landscape-grid';

const RAD = Math.PI / 180;

/** Tilt-direction and azimuth-direction unit vectors at a normal (tilt, azimuth). */
export function motionAxes(tiltDeg: number, azimuthDeg: number): { n: Vec3; t: Vec3; u: Vec3 } {
  const b = tiltDeg * RAD;
  const a = azimuthDeg * RAD;
  return {
    n: normalFromTiltAzimuth(tiltDeg, azimuthDeg),
    t: [Math.cos(b) * Math.sin(a), Math.cos(b) * Math.cos(a), -Math.sin(b)],
    u: [Math.cos(a), -Math.sin(a), 0],
  };
}

function rotateToward(n: Vec3, axis: Vec3, angleRad: number): Vec3 {
  const c = Math.cos(angleRad);
  const s = Math.sin(angleRad);
  return [n[0] * c + axis[0] * s, n[1] * c + axis[1] * s, n[2] * c + axis[2] * s];
}

/** Readings of both detector pairs and the two photodifferentials, W/m². */
export interface DetectorReadings {
  panelWm2: number;
  tiltPlusWm2: number;
  tiltMinusWm2: number;
  azimuthPlusWm2: number;
  azimuthMinusWm2: number;
  /** E(tilt + δ) − E(tilt − δ). */
  tiltDifferentialWm2: number;
  /** E(sideways + δ) − E(sideways − δ), + toward increasing azimuth. */
  azimuthDifferentialWm2: number;
}

export function detectorReadingsWith(irradiance: (n: Vec3) => number, tiltDeg: number, azimuthDeg: number, detectorTiltDeg: number): DetectorReadings {
  const { n, t, u } = motionAxes(tiltDeg, azimuthDeg);
  const d = detectorTiltDeg * RAD;
  const tp = irradiance(rotateToward(n, t, d));
  const tm = irradiance(rotateToward(n, t, -d));
  const ap = irradiance(rotateToward(n, u, d));
  const am = irradiance(rotateToward(n, u, -d));
  return { panelWm2: irradiance(n), tiltPlusWm2: tp, tiltMinusWm2: tm, azimuthPlusWm2: ap, azimuthMinusWm2: am, tiltDifferentialWm2: tp - tm, azimuthDifferentialWm2: ap - am };
}

/** One point of a unit's trajectory. */
export interface TrajectoryPoint {
  tiltDeg: number;
  azimuthDeg: number;
  wm2: number;
  tiltDifferentialWm2: number;
  azimuthDifferentialWm2: number;
}

export interface UnitControl {
  detectorTiltDeg: number;
  /** Degrees moved per W/m² of differential. */
  gainDegPerWm2: number;
  /** No motion on an axis while |differential| ≤ deadband. */
  deadbandWm2: number;
  /** Largest move per step on each axis (actuator speed), default 5°. */
  maxStepDeg?: number;
  maxSteps?: number;
  /** Reachable tilt range, default [0, 90]. */
  tiltRangeDeg?: readonly [number, number];
}

/**
 * Gradient ascent as a unit performs it: each step reads both pairs and moves g·P along each axis (geodesic step),
 * except inside the deadband; tilt is clamped to the reachable range. Stops when both differentials are inside the
 * deadband (converged) or after maxSteps.
 */
export function ascentTrajectoryWith(
  irradiance: (n: Vec3) => number,
  start: { tiltDeg: number; azimuthDeg: number },
  control: UnitControl,
): { points: TrajectoryPoint[]; converged: boolean } {
  const maxStep = (control.maxStepDeg ?? 5) * RAD;
  const [tMin, tMax] = control.tiltRangeDeg ?? [0, 90];
  let tilt = start.tiltDeg;
  let az = start.azimuthDeg;
  const points: TrajectoryPoint[] = [];
  const maxSteps = control.maxSteps ?? 1000;
  for (let k = 0; k <= maxSteps; k++) {
    const r = detectorReadingsWith(irradiance, tilt, az, control.detectorTiltDeg);
    points.push({ tiltDeg: tilt, azimuthDeg: az, wm2: r.panelWm2, tiltDifferentialWm2: r.tiltDifferentialWm2, azimuthDifferentialWm2: r.azimuthDifferentialWm2 });
    const mt = Math.abs(r.tiltDifferentialWm2) > control.deadbandWm2 ? control.gainDegPerWm2 * r.tiltDifferentialWm2 * RAD : 0;
    const ma = Math.abs(r.azimuthDifferentialWm2) > control.deadbandWm2 ? control.gainDegPerWm2 * r.azimuthDifferentialWm2 * RAD : 0;
    if (mt === 0 && ma === 0) return { points, converged: true };
    const dt = Math.max(-maxStep, Math.min(maxStep, mt));
    const da = Math.max(-maxStep, Math.min(maxStep, ma));
    const { n, t, u } = motionAxes(tilt, az);
    const w: Vec3 = [dt * t[0] + da * u[0], dt * t[1] + da * u[1], dt * t[2] + da * u[2]];
    const ang = Math.hypot(w[0], w[1], w[2]);
    const next = rotateToward(n, [w[0] / ang, w[1] / ang, w[2] / ang], ang);
    const ta = tiltAzimuthOf(next);
    tilt = Math.min(tMax, Math.max(tMin, ta.tiltDeg));
    az = ta.tiltDeg < 1e-9 ? az : ta.azimuthDeg;
  }
  return { points, converged: false };
}

/** Cumulative trapezoid integral of a sampled line with unit spacing, and its integral over [a, b] in index units. */
function lineIntegral(values: Float64Array, cum: Float64Array, a: number, b: number): number {
  const n = values.length;
  const at = (x: number): number => {
    if (x <= 0) return x * values[0]!; // constant extension below the first node
    if (x >= n - 1) return cum[n - 1]! + (x - (n - 1)) * values[n - 1]!;
    const k = Math.floor(x);
    const f = x - k;
    const v0 = values[k]!;
    const v1 = values[k + 1]!;
    return cum[k]! + f * v0 + (f * f * (v1 - v0)) / 2;
  };
  return at(b) - at(a);
}

/**
 * Box-blurred landscape for detector tilt δ: average of E over ±δ along the tilt great circle (through the zenith to
 * the opposite azimuth), then over ±δ along the sideways great circle. Needs a periodic (full-circle) azimuth grid
 * starting at tilt 0; values beyond the last tilt row are held constant (compute the landscape with a margin of δ).
 */
export function blurLandscape(l: Landscape, detectorTiltDeg: number): Landscape {
  if (!Number.isFinite(detectorTiltDeg) || detectorTiltDeg < 0 || detectorTiltDeg > 45) {
    throw new RangeError(`detectorTiltDeg: must be a finite number in [0, 45]; got ${detectorTiltDeg}`);
  }
  if (!l.periodicAzimuth || Math.abs(l.tiltsDeg[0]!) > 1e-9) throw new RangeError('blurLandscape: needs a full-circle azimuth grid starting at tilt 0');
  if (detectorTiltDeg === 0) return { ...l, values: l.values.slice(), method: 'blurred' };
  const nT = l.tiltsDeg.length;
  const nA = l.azimuthsDeg.length;
  const step = l.stepDeg;
  const half = detectorTiltDeg / step; // half-width in tilt index units
  const tiltBlur = new Float64Array(nT * nA);
  // 1) along tilt: extended line for column j = column j+180° reversed (negative tilts) + column j
  const line = new Float64Array(2 * nT - 1);
  const cum = new Float64Array(2 * nT - 1);
  for (let j = 0; j < nA; j++) {
    const opp = Math.round(j + nA / 2) % nA;
    for (let i = 0; i < nT; i++) {
      line[nT - 1 + i] = l.values[i * nA + j]!;
      line[nT - 1 - i] = l.values[i * nA + opp]!;
    }
    cum[0] = 0;
    for (let k = 1; k < line.length; k++) cum[k] = cum[k - 1]! + (line[k - 1]! + line[k]!) / 2;
    for (let i = 0; i < nT; i++) {
      const c = nT - 1 + i;
      tiltBlur[i * nA + j] = lineIntegral(line, cum, c - half, c + half) / (2 * half);
    }
  }
  // 2) sideways: points n cos ψ + u sin ψ have tilt acos(cos β cos ψ) and azimuth A + atan2(sin ψ, sin β cos ψ)
  const out = new Float64Array(nT * nA);
  const nS = Math.max(2, Math.ceil((2 * detectorTiltDeg) / step));
  const azStep = l.azimuthStepDeg;
  for (let i = 0; i < nT; i++) {
    const b = l.tiltsDeg[i]! * RAD;
    const rows: number[] = [];
    const fr: number[] = [];
    const shifts: number[] = [];
    const fs: number[] = [];
    const ws: number[] = [];
    for (let s = 0; s <= nS; s++) {
      const psi = (-detectorTiltDeg + (2 * detectorTiltDeg * s) / nS) * RAD;
      const tilt = Math.acos(Math.max(-1, Math.min(1, Math.cos(b) * Math.cos(psi)))) / RAD;
      const dAz = Math.atan2(Math.sin(psi), Math.sin(b) * Math.cos(psi)) / RAD;
      const ti = Math.min(nT - 1, tilt / step);
      const r0 = Math.min(nT - 2, Math.floor(ti));
      rows.push(r0);
      fr.push(Math.min(1, ti - r0));
      const sa = dAz / azStep;
      const s0 = Math.floor(sa);
      shifts.push(s0);
      fs.push(sa - s0);
      ws.push(s === 0 || s === nS ? 0.5 : 1);
    }
    const wsum = ws.reduce((x, y) => x + y, 0);
    for (let j = 0; j < nA; j++) {
      let acc = 0;
      for (let s = 0; s <= nS; s++) {
        const r0 = rows[s]!;
        const f = fr[s]!;
        const j0 = (((j + shifts[s]!) % nA) + nA) % nA;
        const j1 = (j0 + 1) % nA;
        const g = fs[s]!;
        const v00 = tiltBlur[r0 * nA + j0]!;
        const v01 = tiltBlur[r0 * nA + j1]!;
        const v10 = tiltBlur[(r0 + 1) * nA + j0]!;
        const v11 = tiltBlur[(r0 + 1) * nA + j1]!;
        acc += ws[s]! * ((1 - f) * ((1 - g) * v00 + g * v01) + f * ((1 - g) * v10 + g * v11));
      }
      out[i * nA + j] = acc / wsum;
    }
  }
  return { ...l, values: out, method: 'blurred' };
}
