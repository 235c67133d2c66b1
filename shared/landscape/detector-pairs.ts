/**
 * Detector-pair model of a self-orienting unit.
 *
 * Each unit carries two pairs of photodetectors tilted ±δ from the panel normal n: one pair in the tilt plane
 * (normals n cos δ ± t sin δ, t = ∂n/∂tilt) and one pair sideways, in the azimuth direction
 * (n cos δ ± u sin δ, u = horizontal unit vector toward increasing azimuth). The photodifferentials are
 * P_tilt = E(+) − E(−) and P_azimuth = E(+) − E(−). Along one great circle P = ∫_{α−δ}^{α+δ} E′ = 2δ · (box-filtered E)′,
 * so a unit climbing its differentials climbs the landscape box-filtered over ±δ (see blurred-landscape.ts for the
 * two-dimensional, rotation-invariant version used for peak counting).
 * Identities (derived from Lambert's law): beam only, P = −2·DNI·sin α·sin δ (α = angle off the sun in the plane of
 * motion); isotropic sky, P_tilt = −D·sin β·sin δ; ground adds +ρG·sin β·sin δ.
 */
import { normalFromTiltAzimuth, tiltAzimuthOf, type Vec3 } from '../sphere/directions';

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

/** Normals of the panel and its four detectors, [east, north, up]. */
export interface DetectorNormals {
  panel: Vec3;
  tiltPlus: Vec3;
  tiltMinus: Vec3;
  azimuthPlus: Vec3;
  azimuthMinus: Vec3;
}

/**
 * Normals of the panel and the four detectors for an orientation and detector tilt δ: the one detector geometry, used by
 * the landscape engine, the server's site model and the simulator alike.
 * The tilt pair is the panel normal at tilt ± δ (n cos δ ± t sin δ, the same vector; written this way it rounds exactly
 * as the simulator always computed it, an earlier copy here rotated n toward t and differed in the last bits, < 1e-15);
 * the azimuth pair is n cos δ ± u sin δ.
 */
export function detectorNormals(tiltDeg: number, azimuthDeg: number, detectorTiltDeg: number): DetectorNormals {
  const panel = normalFromTiltAzimuth(tiltDeg, azimuthDeg);
  const tiltPlus = normalFromTiltAzimuth(tiltDeg + detectorTiltDeg, azimuthDeg);
  const tiltMinus = normalFromTiltAzimuth(tiltDeg - detectorTiltDeg, azimuthDeg);
  const a = azimuthDeg * RAD;
  const c = Math.cos(detectorTiltDeg * RAD);
  const s = Math.sin(detectorTiltDeg * RAD);
  // u: horizontal, toward increasing azimuth (the clockwise side).
  const u: Vec3 = [Math.cos(a), -Math.sin(a), 0];
  const azimuthPlus: Vec3 = [panel[0] * c + u[0] * s, panel[1] * c + u[1] * s, panel[2] * c];
  const azimuthMinus: Vec3 = [panel[0] * c - u[0] * s, panel[1] * c - u[1] * s, panel[2] * c];
  return { panel, tiltPlus, tiltMinus, azimuthPlus, azimuthMinus };
}

export function detectorReadingsWith(
  irradiance: (n: Vec3) => number,
  tiltDeg: number,
  azimuthDeg: number,
  detectorTiltDeg: number,
): DetectorReadings {
  const d = detectorNormals(tiltDeg, azimuthDeg, detectorTiltDeg);
  const tp = irradiance(d.tiltPlus);
  const tm = irradiance(d.tiltMinus);
  const ap = irradiance(d.azimuthPlus);
  const am = irradiance(d.azimuthMinus);
  return {
    panelWm2: irradiance(d.panel),
    tiltPlusWm2: tp,
    tiltMinusWm2: tm,
    azimuthPlusWm2: ap,
    azimuthMinusWm2: am,
    tiltDifferentialWm2: tp - tm,
    azimuthDifferentialWm2: ap - am,
  };
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
    points.push({
      tiltDeg: tilt,
      azimuthDeg: az,
      wm2: r.panelWm2,
      tiltDifferentialWm2: r.tiltDifferentialWm2,
      azimuthDifferentialWm2: r.azimuthDifferentialWm2,
    });
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
