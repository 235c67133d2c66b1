/**
 * Irradiance on a plane from a sky-dome radiance L(zenith, azimuth) over the upper hemisphere, with no obstruction:
 * E = ∫ L(s) max(0, n·s) dΩ over z > 0, by a Gauss–Legendre product rule with exact limits. For each azimuth the
 * zenith range ends at 90° or where the plane's own horizon n·s = 0 cuts it (tan Z = −cot β / cos(A − A_n)), and the
 * azimuth range is split where that switch happens (A − A_n = ±90°), so every piece is smooth and the rule converges
 * spectrally for smooth skies. Reference integrator for checks and for scaling sky domes; not used per landscape cell.
 */
import { gaussLegendreOn } from './gauss-legendre';

const RAD = Math.PI / 180;

export function skyDomeIrradianceOnPlane(
  radiance: (zenithRad: number, azimuthRad: number) => number,
  tiltDeg: number,
  planeAzimuthDeg: number,
  nodes = 64,
): number {
  const beta = tiltDeg * RAD;
  const an = planeAzimuthDeg * RAD;
  const cb = Math.cos(beta);
  const sb = Math.sin(beta);
  const pieces: [number, number][] =
    sb < 1e-12
      ? [[an, an + 2 * Math.PI]]
      : [
          [an - Math.PI / 2, an + Math.PI / 2],
          [an + Math.PI / 2, an + (3 * Math.PI) / 2],
        ];
  let total = 0;
  for (const [a0, a1] of pieces) {
    const ga = gaussLegendreOn(nodes, a0, a1);
    for (let i = 0; i < nodes; i++) {
      const az = ga.x[i]!;
      const ca = Math.cos(az - an);
      let zMax = Math.PI / 2;
      if (sb > 1e-12 && ca < 0 && cb > 0) zMax = Math.atan2(cb, -sb * ca);
      if (sb > 1e-12 && ca < 0 && cb <= 0) zMax = 0;
      if (zMax <= 0) continue;
      const gz = gaussLegendreOn(nodes, 0, zMax);
      let inner = 0;
      for (let k = 0; k < nodes; k++) {
        const z = gz.x[k]!;
        const cosInc = cb * Math.cos(z) + sb * Math.sin(z) * ca;
        if (cosInc <= 0) continue;
        inner += gz.w[k]! * radiance(z, az) * cosInc * Math.sin(z);
      }
      total += ga.w[i]! * inner;
    }
  }
  return total;
}
