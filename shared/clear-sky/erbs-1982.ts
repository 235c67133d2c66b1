/**
 * Diffuse fraction from the clearness index, D. G. Erbs, S. A. Klein and J. A. Duffie, "Estimation of the diffuse
 * radiation fraction for hourly, daily and monthly-average global radiation", Solar Energy 28(4) (1982) 293–302,
 * doi:10.1016/0038-092X(82)90302-4:
 *   Kd = 1 − 0.09 kt (kt ≤ 0.22); 0.9511 − 0.1604 kt + 4.388 kt² − 16.638 kt³ + 12.336 kt⁴ (0.22 < kt ≤ 0.80); 0.165 (kt > 0.80).
 * Fitted to hourly data; valid for kt 0…1 (inputs are clipped to that range). The split below sets DNI = 0 for
 * zenith > 87° (cos Z too small for a meaningful division), putting all of GHI in DHI there.
 */
export function erbsDiffuseFraction(kt: number): number {
  const k = Math.min(1, Math.max(0, kt));
  if (k <= 0.22) return 1 - 0.09 * k;
  if (k <= 0.8) return 0.9511 - 0.1604 * k + 4.388 * k * k - 16.638 * k ** 3 + 12.336 * k ** 4;
  return 0.165;
}

/** Split measured GHI into DHI and DNI with Erbs; I0n is the extraterrestrial normal irradiance. */
export function erbsSplit(
  ghiWm2: number,
  zenithDeg: number,
  extraterrestrialNormalWm2: number,
): { kt: number; dhiWm2: number; dniWm2: number } {
  const cosZ = Math.cos((zenithDeg * Math.PI) / 180);
  if (cosZ < Math.cos((87 * Math.PI) / 180) || ghiWm2 <= 0) return { kt: 0, dhiWm2: Math.max(0, ghiWm2), dniWm2: 0 };
  const kt = Math.min(1, Math.max(0, ghiWm2 / (extraterrestrialNormalWm2 * cosZ)));
  const dhi = erbsDiffuseFraction(kt) * ghiWm2;
  return { kt, dhiWm2: dhi, dniWm2: Math.max(0, (ghiWm2 - dhi) / cosZ) };
}
