/**
 * Sky-diffuse irradiance on a tilted plane, R. Perez, P. Ineichen, R. Seals, J. Michalsky and R. Stewart,
 * "Modeling daylight availability and irradiance components from direct and global irradiance",
 * Solar Energy 44(5) (1990) 271–289, doi:10.1016/0038-092X(90)90055-H — the standard tilted-plane model used for
 * fixed-tilt baselines (the landscape itself uses the CIE sky distribution instead).
 *
 * ε = [(Dh + In)/Dh + κZ³]/(1 + κZ³), κ = 1.041, Z in radians; Δ = m·Dh/I0n (m relative air mass);
 * F1 = max(0, f11 + f12Δ + f13Z), F2 = f21 + f22Δ + f23Z (Z in radians); a = max(0, cos θ), b = max(cos 85°, cos Z);
 * D_sky = Dh [(1 − F1)(1 + cos β)/2 + F1·a/b + F2·sin β].
 * Coefficients: the paper's "all sites composite 1990" table (3 decimals), bins of ε:
 * [1, 1.065), [1.065, 1.23), [1.23, 1.5), [1.5, 1.95), [1.95, 2.8), [2.8, 4.5), [4.5, 6.2), [6.2, ∞).
 * Valid for the sun above the horizon and Dh > 0 (returns 0 for Dh = 0).
 */
const BIN_EDGES = [1.065, 1.23, 1.5, 1.95, 2.8, 4.5, 6.2];

/** f11 f12 f13 f21 f22 f23 per ε bin (Perez et al. 1990, all-sites composite). */
export const PEREZ_1990_COEFFICIENTS: readonly (readonly [number, number, number, number, number, number])[] = [
  [-0.008, 0.588, -0.062, -0.06, 0.072, -0.022],
  [0.13, 0.683, -0.151, -0.019, 0.066, -0.029],
  [0.33, 0.487, -0.221, 0.055, -0.064, -0.026],
  [0.568, 0.187, -0.295, 0.109, -0.152, -0.014],
  [0.873, -0.392, -0.362, 0.226, -0.462, 0.001],
  [1.132, -1.237, -0.412, 0.288, -0.823, 0.056],
  [1.06, -1.6, -0.359, 0.264, -1.127, 0.131],
  [0.678, -0.327, -0.25, 0.156, -1.377, 0.251],
];

export interface PerezResult {
  skyDiffuseWm2: number;
  clearness: number;
  /** 1 … 8 */
  bin: number;
  brightness: number;
  f1: number;
  f2: number;
}

export function perezSkyDiffuse(args: {
  tiltDeg: number;
  /** Incidence angle of the beam on the plane. */
  incidenceDeg: number;
  zenithDeg: number;
  dhiWm2: number;
  dniWm2: number;
  extraterrestrialNormalWm2: number;
  relativeAirMass: number;
}): PerezResult {
  const RAD = Math.PI / 180;
  if (!(args.dhiWm2 > 0)) return { skyDiffuseWm2: 0, clearness: 1, bin: 1, brightness: 0, f1: 0, f2: 0 };
  const z = args.zenithDeg * RAD;
  const kz3 = 1.041 * z * z * z;
  const clearness = ((args.dhiWm2 + args.dniWm2) / args.dhiWm2 + kz3) / (1 + kz3);
  let bin = 0;
  while (bin < BIN_EDGES.length && clearness >= BIN_EDGES[bin]!) bin++;
  const brightness = (args.relativeAirMass * args.dhiWm2) / args.extraterrestrialNormalWm2;
  const [f11, f12, f13, f21, f22, f23] = PEREZ_1990_COEFFICIENTS[bin]!;
  const f1 = Math.max(0, f11 + f12 * brightness + f13 * z);
  const f2 = f21 + f22 * brightness + f23 * z;
  const a = Math.max(0, Math.cos(args.incidenceDeg * RAD));
  const b = Math.max(Math.cos(85 * RAD), Math.cos(z));
  const beta = args.tiltDeg * RAD;
  const skyDiffuseWm2 = Math.max(0, args.dhiWm2 * ((1 - f1) * ((1 + Math.cos(beta)) / 2) + (f1 * a) / b + f2 * Math.sin(beta)));
  return { skyDiffuseWm2, clearness, bin: bin + 1, brightness, f1, f2 };
}
