/**
 * The surveyed geometry of the demo sites: horizon profiles, glazed facades and atrium lamps. The simulator's scenarios
 * build their skies from it and the seed writes it as the sites' surveys, so model and demo fleet agree. Invented
 * surveys, demo and checks only.
 */
import type { LampInput, ReflectorInput } from '../sky-radiance';

/** Horizon profile points [azimuthDeg, elevationDeg], sorted by azimuth. */
export type HorizonPoints = readonly (readonly [number, number])[];

/**
 * Roof between glass towers (QHL): a city horizon with a tower block to the south-east that hides the morning sun…
 */
export const CITY_HORIZON: HorizonPoints = [
  [0, 6],
  [40, 8],
  [45, 24],
  [100, 24],
  [100, 46],
  [165, 46],
  [170, 9],
  [230, 9],
  [300, 12],
  [350, 6],
];

/**
 * …and two glazed facades that mirror it: one to the west facing east (the morning image outshines the hidden sun) and
 * one to the north facing south (a midday image about 100–110° from the sun, a second lobe where units with narrow
 * detector tilt get trapped).
 */
export const FACADES: readonly ReflectorInput[] = [
  { normalAzimuthDeg: 90, azimuthFromDeg: 200, azimuthToDeg: 300, elevationFromDeg: 1, elevationToDeg: 42, reflectance: 0.4 },
  { normalAzimuthDeg: 180, azimuthFromDeg: 300, azimuthToDeg: 60, elevationFromDeg: 1, elevationToDeg: 45, reflectance: 0.3 },
];

/** School courtyard (FSC) ringed by buildings and tree crowns: the sun is behind obstructions for part of the day. */
export const COURTYARD_HORIZON: HorizonPoints = [
  [0, 22],
  [40, 22],
  [40, 14],
  [75, 16],
  [95, 30],
  [120, 34],
  [135, 12],
  [150, 12],
  [165, 28],
  [200, 28],
  [200, 10],
  [230, 12],
  [250, 26],
  [280, 32],
  [300, 20],
  [330, 20],
  [330, 22],
];

/** A lamp switched by the clock. */
export interface ScheduledLamp extends LampInput {
  /** On between these local solar hours. */
  onHour: number;
  offHour: number;
}

/** Wall and ceiling lamps of the indoor atrium (FGA); lamps far apart make a many-lobed landscape. */
export const ATRIUM_LAMPS: readonly ScheduledLamp[] = [
  { azimuthDeg: 40, elevationDeg: 35, irradianceWm2: 120, onHour: 6.5, offHour: 10 },
  { azimuthDeg: 130, elevationDeg: 30, irradianceWm2: 90, onHour: 6.5, offHour: 10 },
  { azimuthDeg: 180, elevationDeg: 70, irradianceWm2: 60, onHour: 8, offHour: 18 },
  { azimuthDeg: 220, elevationDeg: 35, irradianceWm2: 110, onHour: 15, offHour: 21 },
  { azimuthDeg: 310, elevationDeg: 40, irradianceWm2: 100, onHour: 15, offHour: 21 },
];

/** The atrium walls hide everything below this elevation [°]. */
export const ATRIUM_WALL_DEG = 45;
