/**
 * Traditional CIE overcast sky: P. Moon and D. E. Spencer, "Illumination from a non-uniform sky",
 * Illuminating Engineering 37 (1942) 707–726 (adopted by the CIE in 1955): L(Z) = Lz (1 + 2 cos Z) / 3,
 * so the horizon is one third as bright as the zenith; independent of the sun. Valid for Z in 0…90°.
 */
export function moonSpencerRelativeLuminance(zenithRad: number): number {
  return (1 + 2 * Math.cos(zenithRad)) / 3;
}
