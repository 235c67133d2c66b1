/**
 * The solar disc as a source: angular diameter 0.53° (mean apparent diameter; angular radius 0.2665°), uniform
 * radiance, total irradiance at normal incidence = DNI. Partial occultation by a horizon edge uses the area of a
 * circular segment with the edge taken as a straight line across the disc (exact for a straight edge).
 */
export const SUN_ANGULAR_RADIUS_DEG = 0.2665;

/** Fraction of the disc above an edge, given the disc centre's elevation above the edge in degrees. */
export function sunDiscVisibleFraction(centreAboveEdgeDeg: number, radiusDeg = SUN_ANGULAR_RADIUS_DEG): number {
  const d = centreAboveEdgeDeg / radiusDeg;
  if (d >= 1) return 1;
  if (d <= -1) return 0;
  return 1 - (Math.acos(d) - d * Math.sqrt(1 - d * d)) / Math.PI;
}
