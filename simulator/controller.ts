/**
 * The gradient-ascent controller of a unit: it turns the photodifferentials of the two detector pairs into motion.
 * Each pair's difference is the slope of the irradiance landscape box-filtered over ±δ, so the unit climbs the blurred
 * landscape. Motion rate = gain × difference, zero inside the deadband, capped by the rate limit. The azimuth rate is
 * divided by sin(tilt) (bounded) because an azimuth step moves the panel normal by only sin(tilt) times as much.
 */
import type { Readings } from './detectors';

export interface ControllerConfig {
  /** Tilt of each detector from the panel normal [°]. */
  detectorTiltDeg: number;
  /** Rate per differential [°/s per W/m²]. */
  gain: number;
  /** Differences below this are ignored [W/m²]. */
  deadbandWm2: number;
  /** Maximum commanded rate per axis [°/s]. */
  rateLimitDegS: number;
  /** Telemetry interval [s]. */
  reportIntervalS: number;
}

export const DEFAULT_CONTROLLER: ControllerConfig = {
  detectorTiltDeg: 20,
  gain: 0.05,
  deadbandWm2: 2,
  rateLimitDegS: 2,
  reportIntervalS: 5,
};

export interface ControlOutput {
  dTiltDeg: number;
  dAzimuthDeg: number;
  /** Both pairs inside the deadband. */
  balanced: boolean;
}

/** One control step of dt seconds at the current encoder tilt. */
export function controlStep(cfg: ControllerConfig, r: Readings, tiltDeg: number, dtS: number): ControlOutput {
  const dTilt = r.tiltPlusWm2 - r.tiltMinusWm2;
  const dAz = r.azimuthPlusWm2 - r.azimuthMinusWm2;
  const lim = cfg.rateLimitDegS;
  const tiltRate = Math.abs(dTilt) <= cfg.deadbandWm2 ? 0 : Math.max(-lim, Math.min(lim, cfg.gain * dTilt));
  const sinT = Math.max(0.2, Math.sin((tiltDeg * Math.PI) / 180));
  const azRate = Math.abs(dAz) <= cfg.deadbandWm2 ? 0 : Math.max(-lim, Math.min(lim, (cfg.gain * dAz) / sinT));
  return { dTiltDeg: tiltRate * dtS, dAzimuthDeg: azRate * dtS, balanced: tiltRate === 0 && azRate === 0 };
}
