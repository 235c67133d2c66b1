/**
 * Approximate solar declination, P. I. Cooper, "The absorption of radiation in solar stills", Solar Energy 12(3)
 * (1969) 333–346, doi:10.1016/0038-092X(69)90047-4, as given by Duffie & Beckman (eq. 1.6.1a):
 * δ = 23.45° · sin(360° (284 + n) / 365), n = day of year 1…365. Accuracy ≈ ±1°; use SPA for anything but estimates.
 */
export function declinationCooperDeg(dayOfYear: number): number {
  return 23.45 * Math.sin((2 * Math.PI * (284 + dayOfYear)) / 365);
}
