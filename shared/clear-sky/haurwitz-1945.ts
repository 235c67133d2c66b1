/**
 * Clear-sky global horizontal irradiance, B. Haurwitz, "Insolation in relation to cloudiness and cloud density",
 * Journal of Meteorology 2 (1945) 154–166, in the form evaluated by M. J. Reno, C. W. Hansen and J. S. Stein,
 * "Global Horizontal Irradiance Clear Sky Models: Implementation and Analysis", Sandia SAND2012-2389 (2012):
 * GHI = 1098·cosZ·exp(−0.059/cosZ) W/m². Constants pinned to 1098 and 0.059 (some texts print 0.057).
 * Valid: apparent zenith 0…90° (0 below the horizon). Gives GHI only; no altitude or turbidity dependence.
 */
export const HAURWITZ_A_WM2 = 1098;
export const HAURWITZ_B = 0.059;

export function clearSkyGhiHaurwitz(apparentZenithDeg: number): number {
  const c = Math.cos((apparentZenithDeg * Math.PI) / 180);
  if (!(c > 0)) return 0;
  return HAURWITZ_A_WM2 * c * Math.exp(-HAURWITZ_B / c);
}
