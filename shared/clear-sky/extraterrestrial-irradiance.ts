/**
 * Extraterrestrial normal irradiance G_on = G_sc (1 + 0.033 cos(360° n / 365)), J. A. Duffie and W. A. Beckman,
 * "Solar Engineering of Thermal Processes", Wiley (4th ed. 2013, eq. 1.4.1a), with the solar constant
 * G_sc = 1361 W/m² of G. Kopp and J. L. Lean, Geophys. Res. Lett. 38 (2011) L01706, doi:10.1029/2010GL045777.
 * n: day of year 1…366. Accuracy ≈ ±0.1 % against the full orbital expression.
 */
export const SOLAR_CONSTANT_WM2 = 1361;

export function extraterrestrialNormalIrradianceWm2(dayOfYear: number, solarConstantWm2 = SOLAR_CONSTANT_WM2): number {
  return solarConstantWm2 * (1 + 0.033 * Math.cos((2 * Math.PI * dayOfYear) / 365));
}

/** Day of year (1…366) of an instant, in UTC. */
export function dayOfYearUtc(unixMs: number): number {
  const d = new Date(unixMs);
  return Math.floor((unixMs - Date.UTC(d.getUTCFullYear(), 0, 1)) / 86_400_000) + 1;
}
