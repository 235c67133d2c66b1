/** Skies used by the landscape property tests (invented geometry; magnitudes in the range of real skies). */
import type { SkyInput } from '../../shared/landscape/index';

export const testSkies: Record<string, SkyInput> = {
  'clear sky with a glass facade reflecting the sun': {
    sun: { azimuthDeg: 110, elevationDeg: 20, dniWm2: 700 },
    dhiWm2: 100,
    skyType: 12,
    albedo: 0.2,
    reflectors: [
      { normalAzimuthDeg: 90, azimuthFromDeg: 230, azimuthToDeg: 300, elevationFromDeg: 0, elevationToDeg: 40, reflectance: 0.35 },
    ],
  },
  'two facades, turbid sky': {
    sun: { azimuthDeg: 150, elevationDeg: 25, dniWm2: 800 },
    dhiWm2: 90,
    skyType: 13,
    albedo: 0.15,
    reflectors: [
      { normalAzimuthDeg: 70, azimuthFromDeg: 220, azimuthToDeg: 290, elevationFromDeg: 0, elevationToDeg: 45, reflectance: 0.3 },
      { normalAzimuthDeg: 180, azimuthFromDeg: 330, azimuthToDeg: 60, elevationFromDeg: 0, elevationToDeg: 50, reflectance: 0.25 },
    ],
  },
  'urban canyon, sun behind a building': {
    sun: { azimuthDeg: 100, elevationDeg: 30, dniWm2: 600 },
    dhiWm2: 150,
    skyType: 11,
    albedo: 0.25,
    horizon: [
      [0, 10],
      [60, 10],
      [60, 45],
      [150, 45],
      [150, 5],
      [200, 5],
      [200, 40],
      [300, 40],
      [300, 12],
    ],
  },
  'CIE overcast': { sun: { azimuthDeg: 200, elevationDeg: 25, dniWm2: 0 }, dhiWm2: 150, skyType: 1, albedo: 0.2 },
  'atrium with two opposite lamps': {
    sun: null,
    dhiWm2: 0,
    lamps: [
      { azimuthDeg: 0, elevationDeg: 20, irradianceWm2: 60 },
      { azimuthDeg: 180, elevationDeg: 20, irradianceWm2: 45 },
    ],
  },
};
