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
  samples: { atMs: number; tiltDeg: number; azimuthDeg: number; poaWm2: number }[];
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

/** Reversals, path and net motion of a sequence of orientations. */
export function motionStats(samples: readonly { atMs: number; tiltDeg: number; azimuthDeg: number }[], stepDeg: number): MotionStats {
  // Tilt and weighted azimuth in scalars (no arrays per step: this runs over the whole window on every report).
  let reversals = 0;
  let path = 0;
  let lastSignTilt = 0;
  let lastSignAzimuth = 0;
  let accTilt = 0;
  let accAzimuth = 0;
  for (let i = 1; i < samples.length; i++) {
    const a = samples[i - 1]!;
    const b = samples[i]!;
    const w = Math.max(0.2, Math.sin((((a.tiltDeg + b.tiltDeg) / 2) * Math.PI) / 180));
    const dTilt = b.tiltDeg - a.tiltDeg;
    const dAzimuth = azimuthDelta(a.azimuthDeg, b.azimuthDeg) * w;
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
  const first = samples[0];
  const last = samples[samples.length - 1];
  let net = 0;
  if (first && last) {
    const w = Math.max(0.2, Math.sin((((first.tiltDeg + last.tiltDeg) / 2) * Math.PI) / 180));
    net = Math.hypot(last.tiltDeg - first.tiltDeg, azimuthDelta(first.azimuthDeg, last.azimuthDeg) * w);
  }
  const spanMin = first && last ? (last.atMs - first.atMs) / 60_000 : 0;
  return { reversalsPerHour: spanMin > 0 ? (reversals * 60) / spanMin : 0, pathDeg: path, netDeg: net, spanMin };
}

/** Standard deviation over mean of the in-plane irradiance of the samples. */
export function lightVariation(samples: readonly { poaWm2: number }[]): number {
  if (samples.length < 2) return 0;
  const mean = samples.reduce((a, x) => a + x.poaWm2, 0) / samples.length;
  if (mean <= 0) return 0;
  const variance = samples.reduce((a, x) => a + (x.poaWm2 - mean) ** 2, 0) / samples.length;
  return Math.sqrt(variance) / mean;
}

export class HuntingDetector {
  private readonly units = new Map<number, UnitState>();

  assess(unit: UnitRef, t: Telemetry, atMs: number, daylight: boolean, open: boolean, s: HealthSettings): Assessment {
    let u = this.units.get(unit.unitId);
    if (!u) this.units.set(unit.unitId, (u = { siteId: unit.siteId, samples: [], moving: false, atMs }));
    u.atMs = atMs;
    u.moving = false;
    if (MOTION_FREE_MODES.has(t.mode) || !daylight) {
      u.samples = [];
      return judged(false);
    }
    u.samples.push({ atMs, tiltDeg: t.tiltDeg, azimuthDeg: t.azimuthDeg, poaWm2: t.poaWm2 });
    const windowMs = s.huntingWindowMin * 60_000;
    while (u.samples.length && atMs - u.samples[0]!.atMs > windowMs) u.samples.shift();
    const st = motionStats(u.samples, s.huntingStepDeg);
    if (st.spanMin < 0.8 * s.huntingWindowMin) return judged(open ? null : false);
    u.moving = st.reversalsPerHour >= s.huntingReversalsPerHour && st.netDeg < s.huntingNetFraction * st.pathDeg;
    // Hunting is oscillation under steady light; under changing light the motion may be the unit following it.
    if (u.moving && lightVariation(u.samples) > s.huntingMaxLightVariation) return judged(open ? null : false);
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
