/**
 * Approximate equation of time, J. W. Spencer, "Fourier series representation of the position of the sun",
 * Search 2(5) (1971) 172, in the form of Duffie & Beckman eq. 1.5.3 (minutes):
 * E = 229.2 (0.000075 + 0.001868 cos B − 0.032077 sin B − 0.014615 cos 2B − 0.04089 sin 2B), B = (n − 1)·360°/365.
 * Accuracy ≈ ±0.5 min. Solar time − standard time = 4 (L_st − L_loc) + E, longitudes in degrees west.
 */
export function equationOfTimeSpencerMin(dayOfYear: number): number {
  const b = (2 * Math.PI * (dayOfYear - 1)) / 365;
  return 229.2 * (0.000075 + 0.001868 * Math.cos(b) - 0.032077 * Math.sin(b) - 0.014615 * Math.cos(2 * b) - 0.04089 * Math.sin(2 * b));
}
