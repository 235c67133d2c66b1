/**
 * What each injected fault does to a unit, as named numbers (invented magnitudes, chosen so each fault is plainly visible
 * to its detector within its typical duration), and the fault-effect state a unit carries while faults are active.
 * Which fault starts when is faults.ts; how the unit reacts (stall detection, stow, modes) is unit-model.ts.
 */
import type { AxisState } from './actuator';

export const FAULT_EFFECTS = {
  /** A knock or a bad manual setting: detectors narrowed, and the unit sent off to a random orientation. */
  trap: {
    /** Detector tilt in effect while the fault lasts [°]. */
    detectorTiltDeg: 4,
    /** Range of the random tilt it restarts from [°]. */
    restartTiltDeg: [20, 70] as const,
    /** The random azimuth keeps this far inside the azimuth travel [°]. */
    restartAzimuthMarginDeg: 10,
  },
  /** The structure falls behind the encoder: this fraction of motor travel is lost while the axis moves. */
  slip: { fraction: 0.3 },
  /** One detector loses sensitivity: gain falls by this much per hour, down to a floor (multipliers of its gain). */
  drift: { lossPerHour: 0.2, floor: 0.5 },
  /** A dead detector reads its dark floor plus half its usual noise [W/m²]. */
  deadDetector: { floorWm2: 0.3, noiseShare: 0.5 },
  /** A gain fault: controller gain multiplied, deadband removed, so the unit overshoots back and forth. */
  hunting: { gainFactor: 15, deadbandWm2: 0 },
  /** Dirt builds up: panel and detector transmittance fall by this much per day, down to a floor. */
  soiling: { lossPerDay: 0.05, floorTransmittance: 0.6 },
} as const;

/** The effects of the faults active on a unit (all neutral when none is). */
export interface FaultEffectState {
  /** Comms loss: nothing leaves the unit. */
  commsDown: boolean;
  /** Firmware stuck in stow: accepts a release, never completes it. */
  stuckStowed: boolean;
  gainFactor: number;
  deadbandOverride: number | null;
  detectorTiltOverride: number | null;
  /** Drift of one detector's gain [per s], and which detector (−1 none). */
  driftRatePerS: number;
  driftDetector: number;
  /** Loss of transmittance to soiling [per s]. */
  soilingRatePerS: number;
}

export function noFaultEffects(): FaultEffectState {
  return {
    commsDown: false,
    stuckStowed: false,
    gainFactor: 1,
    deadbandOverride: null,
    detectorTiltOverride: null,
    driftRatePerS: 0,
    driftDetector: -1,
    soilingRatePerS: 0,
  };
}

/** The axis a fault hits: even targets the tilt axis, odd the azimuth axis. */
export function axisOf(target: number, tilt: AxisState, azimuth: AxisState): AxisState {
  return target % 2 === 0 ? tilt : azimuth;
}

/** Advances the slow faults by dt seconds: the drifting detector's multiplier (in place) and the soiling transmittance (returned). */
export function stepSlowFaults(fx: FaultEffectState, detectorDrift: number[], soiling: number, dtS: number): number {
  if (fx.driftDetector >= 0) {
    const i = fx.driftDetector;
    detectorDrift[i] = Math.max(FAULT_EFFECTS.drift.floor, detectorDrift[i]! + fx.driftRatePerS * dtS);
  }
  return fx.soilingRatePerS > 0 ? Math.max(FAULT_EFFECTS.soiling.floorTransmittance, soiling - fx.soilingRatePerS * dtS) : soiling;
}
