/**
 * Clear-sky irradiance, P. Ineichen and R. Perez, "A new airmass independent formulation for the Linke turbidity
 * coefficient", Solar Energy 73(3) (2002) 151–157, doi:10.1016/S0038-092X(02)00045-2 (with the altitude terms of the paper).
 *
 * fh1 = e^(−h/8000), fh2 = e^(−h/1250), cg1 = 5.09e-5·h + 0.868, cg2 = 3.92e-5·h + 0.0387;
 * GHI = cg1·I0·cosZ·exp(−cg2·AM·(fh1 + fh2(TL − 1))) [· exp(0.01·AM^1.8) when `perezEnhancement`];
 * DNI = min((0.664 + 0.163/fh1)·I0·exp(−0.09·AM(TL − 1)), GHI(1 − (0.1 − 0.2e^(−TL))/(0.1 + 0.882/fh1))/cosZ);
 * DHI = GHI − DNI·cosZ. AM is the absolute (pressure-corrected) air mass.
 * Valid: zenith 0…90°, altitude 0…≈ 4000 m, Linke turbidity ≈ 1…7. All outputs 0 when the sun is below the horizon.
 */
export interface ClearSkyIrradiance {
  ghiWm2: number;
  dniWm2: number;
  dhiWm2: number;
}

export function clearSkyIneichenPerez(args: {
  apparentZenithDeg: number;
  absoluteAirMass: number;
  linkeTurbidity: number;
  altitudeM: number;
  extraterrestrialNormalWm2: number;
  /** Multiply GHI by exp(0.01·AM^1.8) (Perez's enhancement factor); default false. */
  perezEnhancement?: boolean;
}): ClearSkyIrradiance {
  const cosZ = Math.cos((args.apparentZenithDeg * Math.PI) / 180);
  const am = args.absoluteAirMass;
  if (!(cosZ > 0) || !Number.isFinite(am)) return { ghiWm2: 0, dniWm2: 0, dhiWm2: 0 };
  const h = args.altitudeM;
  const tl = args.linkeTurbidity;
  const i0 = args.extraterrestrialNormalWm2;
  const fh1 = Math.exp(-h / 8000);
  const fh2 = Math.exp(-h / 1250);
  const cg1 = 5.09e-5 * h + 0.868;
  const cg2 = 3.92e-5 * h + 0.0387;
  let ghi = cg1 * i0 * cosZ * Math.exp(-cg2 * am * (fh1 + fh2 * (tl - 1)));
  if (args.perezEnhancement) ghi *= Math.exp(0.01 * Math.pow(am, 1.8));
  ghi = Math.max(0, ghi);
  const b = 0.664 + 0.163 / fh1;
  const dniA = b * i0 * Math.exp(-0.09 * am * (tl - 1));
  const dniB = (ghi * (1 - (0.1 - 0.2 * Math.exp(-tl)) / (0.1 + 0.882 / fh1))) / cosZ;
  const dni = Math.max(0, Math.min(dniA, dniB));
  const dhi = Math.max(0, ghi - dni * cosZ);
  return { ghiWm2: ghi, dniWm2: dni, dhiWm2: dhi };
}
