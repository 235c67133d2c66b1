/**
 * ΔT = TT − UT estimate from the polynomial expressions of F. Espenak and J. Meeus,
 * "Five Millennium Canon of Solar Eclipses: −1999 to +3000", NASA/TP-2006-214141 (2006), section 2.6
 * (coefficients from memory of the published expressions; not confirmed against the report — an SPA user
 * who knows ΔT for the instant should pass it). Used only as a default; ΔT of ±10 s moves the sun by ≈ 0.04°.
 * Valid: any year; 1900…2050 follows the fitted pieces, other years the long-term parabola −20 + 32u², u = (y − 1820)/100.
 */

/** Decimal year of an instant (UTC), as the report defines y = year + (month − 0.5)/12. */
export function decimalYear(unixMs: number): number {
  const d = new Date(unixMs);
  return d.getUTCFullYear() + (d.getUTCMonth() + 0.5) / 12;
}

/** ΔT in seconds for a decimal year. */
export function deltaTSecondsEspenakMeeus(year: number): number {
  const longTerm = (y: number) => -20 + 32 * ((y - 1820) / 100) ** 2;
  if (year >= 2005 && year < 2050) {
    const t = year - 2000;
    return 62.92 + 0.32217 * t + 0.005589 * t * t;
  }
  if (year >= 1986 && year < 2005) {
    const t = year - 2000;
    return 63.86 + 0.3345 * t - 0.060374 * t ** 2 + 0.0017275 * t ** 3 + 0.000651814 * t ** 4 + 0.00002373599 * t ** 5;
  }
  if (year >= 1961 && year < 1986) {
    const t = year - 1975;
    return 45.45 + 1.067 * t - t ** 2 / 260 - t ** 3 / 718;
  }
  if (year >= 1941 && year < 1961) {
    const t = year - 1950;
    return 29.07 + 0.407 * t - t ** 2 / 233 + t ** 3 / 2547;
  }
  if (year >= 1920 && year < 1941) {
    const t = year - 1920;
    return 21.2 + 0.84493 * t - 0.0761 * t ** 2 + 0.0020936 * t ** 3;
  }
  if (year >= 1900 && year < 1920) {
    const t = year - 1900;
    return -2.79 + 1.494119 * t - 0.0598939 * t ** 2 + 0.0061966 * t ** 3 - 0.000197 * t ** 4;
  }
  if (year >= 2050 && year < 2150) return longTerm(year) - 0.5628 * (2150 - year);
  return longTerm(year);
}
