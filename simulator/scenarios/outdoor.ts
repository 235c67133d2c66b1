/** Small helpers shared by the outdoor scenarios. */
import type { SkyInput, SkyType } from '../../shared/sky-radiance';
import { wrap360 } from '../../shared/sphere/directions';

/** Sky input for an outdoor site from beam and diffuse, with the sun only while it is up. */
export function outdoorSky(
  sun: { azimuthDeg: number; elevationDeg: number },
  dniWm2: number,
  dhiWm2: number,
  skyType: SkyType,
  albedo: number,
  extra: Pick<SkyInput, 'horizon' | 'reflectors' | 'lamps'> = {},
): SkyInput {
  const up = sun.elevationDeg > 0;
  return {
    sun: up ? { azimuthDeg: wrap360(sun.azimuthDeg), elevationDeg: sun.elevationDeg, dniWm2: Math.min(1500, Math.max(0, dniWm2)) } : null,
    dhiWm2: up ? Math.max(0, dhiWm2) : 0,
    skyType: up ? skyType : 'isotropic',
    albedo,
    ...extra,
  };
}
