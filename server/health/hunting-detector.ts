/**
 * Hunting: the unit keeps reversing its motion with little net progress (gain too high, deadband too small, a loose
 * detector). Counted on the reported angles over a sliding window: a reversal is a change of direction between two
 * motions of at least `huntingStepDeg`, azimuth motion weighted by sin(tilt) (an azimuth step near the zenith hardly moves
 * the panel normal). Not while scanning (a scan sweeps back and forth by design), stowed, held or in fault; not at night.
 */
import type { Telemetry } from '../../shared/contracts/wire';
import type { HealthSettings } from './health-settings';
import { azimuthDelta, judged, MOTION_FREE_MODES, readingsSnapshot, round1, type Assessment, type UnitRef } from './unit-sample';

interface UnitState {
  siteId: number;
  samples: SampleWindow;
  /** Whether the unit's latest window looked like hunting, and when. */
  moving: boolean;
  atMs: number;
}

const SITE_RECENT_MS = 120_000;

export interface MotionStats {
  reversalsPerHour: number;
  pathDeg: number;
  netDeg: number;
  spanMin: number;
}

/** The azimuth weight of a step between two tilts: sin of their mean, at least 0.2 (a step near the zenith hardly moves the normal). */
const azimuthWeight = (tiltA: number, tiltB: number) => Math.max(0.2, Math.sin((((tiltA + tiltB) / 2) * Math.PI) / 180));

/**
 * A unit's samples over the hunting window, oldest first, in columns (a unit reporting every second keeps 600: no
 * object per report for the collector to trace), with each sample's step from the one before it worked out once.
 */
export class SampleWindow {
  private cap = 16;
  private head = 0;
  length = 0;
  private atMs = new Float64Array(this.cap);
  private tiltDeg = new Float64Array(this.cap);
  private azimuthDeg = new Float64Array(this.cap);
  private poaWm2 = new Float64Array(this.cap);
  /** Tilt step and weighted azimuth step from the previous sample [°] (unused for the oldest). */
  private stepTilt = new Float64Array(this.cap);
  private stepAzimuth = new Float64Array(this.cap);

  push(atMs: number, tiltDeg: number, azimuthDeg: number, poaWm2: number): void {
    if (this.length === this.cap) this.grow();
    const i = (this.head + this.length) % this.cap;
    if (this.length > 0) {
      const p = (i + this.cap - 1) % this.cap;
      this.stepTilt[i] = tiltDeg - this.tiltDeg[p]!;
      this.stepAzimuth[i] = azimuthDelta(this.azimuthDeg[p]!, azimuthDeg) * azimuthWeight(this.tiltDeg[p]!, tiltDeg);
    }
    this.atMs[i] = atMs;
    this.tiltDeg[i] = tiltDeg;
    this.azimuthDeg[i] = azimuthDeg;
    this.poaWm2[i] = poaWm2;
    this.length++;
  }

  /** Drops the samples more than `windowMs` older than `atMs` from the front. */
  dropOlder(atMs: number, windowMs: number): void {
    while (this.length && atMs - this.atMs[this.head]! > windowMs) {
      this.head = (this.head + 1) % this.cap;
      this.length--;
    }
  }

  clear(): void {
    this.head = 0;
    this.length = 0;
  }

  /** Reversals, path and net motion over the window. */
  motionStats(stepDeg: number): MotionStats {
    let reversals = 0;
    let path = 0;
    let lastSignTilt = 0;
    let lastSignAzimuth = 0;
    let accTilt = 0;
    let accAzimuth = 0;
    for (let k = 1; k < this.length; k++) {
      const i = (this.head + k) % this.cap;
      const dTilt = this.stepTilt[i]!;
      const dAzimuth = this.stepAzimuth[i]!;
      path += Math.abs(dTilt);
      accTilt += dTilt;
      if (Math.abs(accTilt) >= stepDeg) {
        const sign = Math.sign(accTilt);
        if (lastSignTilt !== 0 && sign !== lastSignTilt) reversals++;
        lastSignTilt = sign;
        accTilt = 0;
      }
      path += Math.abs(dAzimuth);
      accAzimuth += dAzimuth;
      if (Math.abs(accAzimuth) >= stepDeg) {
        const sign = Math.sign(accAzimuth);
        if (lastSignAzimuth !== 0 && sign !== lastSignAzimuth) reversals++;
        lastSignAzimuth = sign;
        accAzimuth = 0;
      }
    }
    let net = 0;
    let spanMin = 0;
    if (this.length) {
      const f = this.head;
      const l = (this.head + this.length - 1) % this.cap;
      net = Math.hypot(
        this.tiltDeg[l]! - this.tiltDeg[f]!,
        azimuthDelta(this.azimuthDeg[f]!, this.azimuthDeg[l]!) * azimuthWeight(this.tiltDeg[f]!, this.tiltDeg[l]!),
      );
      spanMin = (this.atMs[l]! - this.atMs[f]!) / 60_000;
    }
    return { reversalsPerHour: spanMin > 0 ? (reversals * 60) / spanMin : 0, pathDeg: path, netDeg: net, spanMin };
  }

  /** The in-plane irradiances, oldest first. */
  poaValues(): number[] {
    const out: number[] = [];
    for (let k = 0; k < this.length; k++) out.push(this.poaWm2[(this.head + k) % this.cap]!);
    return out;
  }

  private grow(): void {
    const cap = this.cap * 2;
    const copy = (a: Float64Array) => {
      const b = new Float64Array(cap);
      for (let k = 0; k < this.length; k++) b[k] = a[(this.head + k) % this.cap]!;
      return b;
    };
    this.atMs = copy(this.atMs);
    this.tiltDeg = copy(this.tiltDeg);
    this.azimuthDeg = copy(this.azimuthDeg);
    this.poaWm2 = copy(this.poaWm2);
    this.stepTilt = copy(this.stepTilt);
    this.stepAzimuth = copy(this.stepAzimuth);
    this.head = 0;
    this.cap = cap;
  }
}

/** Reversals, path and net motion of a sequence of orientations. */
export function motionStats(samples: readonly { atMs: number; tiltDeg: number; azimuthDeg: number }[], stepDeg: number): MotionStats {
  const w = new SampleWindow();
  for (const x of samples) w.push(x.atMs, x.tiltDeg, x.azimuthDeg, 0);
  return w.motionStats(stepDeg);
}

/** Standard deviation over mean of in-plane irradiances. */
export function lightVariation(poaWm2: readonly number[]): number {
  if (poaWm2.length < 2) return 0;
  const mean = poaWm2.reduce((a, x) => a + x, 0) / poaWm2.length;
  if (mean <= 0) return 0;
  const variance = poaWm2.reduce((a, x) => a + (x - mean) ** 2, 0) / poaWm2.length;
  return Math.sqrt(variance) / mean;
}

export class HuntingDetector {
  private readonly units = new Map<number, UnitState>();

  assess(unit: UnitRef, t: Telemetry, atMs: number, daylight: boolean, open: boolean, s: HealthSettings): Assessment {
    let u = this.units.get(unit.unitId);
    if (!u) this.units.set(unit.unitId, (u = { siteId: unit.siteId, samples: new SampleWindow(), moving: false, atMs }));
    u.atMs = atMs;
    u.moving = false;
    if (MOTION_FREE_MODES.has(t.mode) || !daylight) {
      u.samples.clear();
      return judged(false);
    }
    u.samples.push(atMs, t.tiltDeg, t.azimuthDeg, t.poaWm2);
    const windowMs = s.huntingWindowMin * 60_000;
    u.samples.dropOlder(atMs, windowMs);
    const st = u.samples.motionStats(s.huntingStepDeg);
    if (st.spanMin < 0.8 * s.huntingWindowMin) return judged(open ? null : false);
    u.moving = st.reversalsPerHour >= s.huntingReversalsPerHour && st.netDeg < s.huntingNetFraction * st.pathDeg;
    // Hunting is oscillation under steady light; under changing light the motion may be the unit following it.
    if (u.moving && lightVariation(u.samples.poaValues()) > s.huntingMaxLightVariation) return judged(open ? null : false);
    // The same restlessness on most of the site at once is the sky changing (passing clouds), not this unit. Looked at
    // only when this unit moves that way: a pass over the fleet on every report would make each report O(units).
    if (u.moving && this.siteMoving(unit, atMs, s)) return judged(open ? null : false);
    if (u.moving) {
      return judged(true, () => ({
        severity: 'P3',
        message: `${round1(st.reversalsPerHour)} reversals per hour over the last ${round1(st.spanMin)} min: ${round1(st.pathDeg)}° travelled for ${round1(st.netDeg)}° of net motion.`,
        advice:
          'Lower the gain or widen the deadband (New settings on the unit page), and check the detectors for a loose mount or intermittent reading; hunting wears the drive.',
        evidence: { readings: readingsSnapshot(t), ...Object.fromEntries(Object.entries(st).map(([k, v]) => [k, round1(v)])) },
      }));
    }
    if (st.reversalsPerHour < s.huntingReversalsPerHour / 2) return judged(false);
    return judged(open ? null : false);
  }

  forget(unitId: number): void {
    this.units.delete(unitId);
  }

  private siteMoving(unit: UnitRef, atMs: number, s: HealthSettings): boolean {
    let peers = 0;
    let moving = 0;
    for (const [id, x] of this.units) {
      if (id === unit.unitId || x.siteId !== unit.siteId || atMs - x.atMs > SITE_RECENT_MS) continue;
      peers++;
      if (x.moving) moving++;
    }
    return peers >= 2 && moving >= s.huntingSiteShare * peers;
  }
}
