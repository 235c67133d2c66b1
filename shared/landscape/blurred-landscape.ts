/**
 * The blurred landscape a unit with detector tilt δ effectively climbs.
 *
 * Along one great circle a detector pair tilted ±δ reads P = E(α+δ) − E(α−δ) = 2δ · d/dα [box average of E over
 * ±δ] exactly, so in one dimension the unit climbs E box-filtered over ±δ. On the sphere the two pairs act along
 * local tilt/azimuth axes that rotate around the zenith, so a separable box has a preferred frame and makes spurious
 * structure near tilt 0. We use instead the rotation-invariant average over a spherical cap with the same second
 * moment as the ±δ box (variance δ²/3 per axis ⇒ cap radius r = 2δ/√3). It is exact in the spherical-harmonic domain
 * (zonal multipliers K_l, see sphere/cap-average) and tabulated for the sun, its images and lamps, so a blurred
 * landscape costs the same as a landscape.
 */
import { landscapeFastValues, SH_ORDER } from './irradiance-fast';
import type { Landscape } from './landscape-grid';

/** Cap radius (deg) equivalent to a detector tilt δ (deg). */
export function capRadiusForDetectorTiltDeg(detectorTiltDeg: number): number {
  return (2 * detectorTiltDeg) / Math.sqrt(3);
}

/** Blurred landscape on the same grid as `l` (which must carry its sky, as computeLandscape's result does). */
export function blurLandscape(l: Landscape, detectorTiltDeg: number): Landscape {
  if (typeof detectorTiltDeg !== 'number' || !Number.isFinite(detectorTiltDeg) || detectorTiltDeg < 0 || detectorTiltDeg > 45) {
    throw new RangeError(`detectorTiltDeg: must be a finite number in [0, 45]; got ${detectorTiltDeg}`);
  }
  if (!l.sky) throw new RangeError('landscape: blurLandscape needs a landscape computed from a sky (computeLandscape)');
  const values = landscapeFastValues(l.sky, l.tiltsDeg, l.azimuthsDeg, SH_ORDER, capRadiusForDetectorTiltDeg(detectorTiltDeg));
  return { ...l, values, method: 'blurred', detectorTiltDeg };
}
