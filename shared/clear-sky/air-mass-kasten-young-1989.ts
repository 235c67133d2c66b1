/**
 * Relative optical air mass, F. Kasten and A. T. Young, "Revised optical air mass tables and approximation formula",
 * Applied Optics 28(22) (1989) 4735–4738, doi:10.1364/AO.28.004735: m = 1 / (cos Z + 0.50572 (96.07995° − Z)^−1.6364).
 * Valid for apparent zenith 0…90° (returns Infinity beyond 96°). Absolute (pressure-corrected) air mass = m · p / 1013.25 hPa.
 */
export function relativeAirMassKastenYoung(zenithDeg: number): number {
  if (zenithDeg >= 96.07995) return Infinity;
  return 1 / (Math.cos((zenithDeg * Math.PI) / 180) + 0.50572 * Math.pow(96.07995 - zenithDeg, -1.6364));
}

export function absoluteAirMass(relativeAirMass: number, pressureHpa: number): number {
  return (relativeAirMass * pressureHpa) / 1013.25;
}
