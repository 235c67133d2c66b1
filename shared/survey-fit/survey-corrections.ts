/**
 * The corrections to a site survey that its units' measurements can estimate, as a parameter vector with bounds:
 * - `albedo`: the site's ground reflectance, absolute, within ±0.2 of the surveyed value and in [0.02, 0.9];
 * - `reflectors.<i>.reflectance`: each facade's specular reflectance, within ±0.3 of the survey and in [0, 1];
 * - `reflectors.<i>.normalAzimuthDeg`: each facade's normal azimuth, within ±15° (where it sends the sun's image);
 * - `horizon.<from>-<to>`: the mean elevation of the surveyed horizon points in each 30° azimuth sector, within ±10°;
 *   a correction shifts every point of the sector by the same amount (each point then kept in 0…90°). Sectors without
 *   a surveyed point have no parameter (nothing to shift);
 * - `station.scale`: a factor on the weather station's GHI and DHI as the model reads them, 0.8…1.2. Not part of the
 *   survey (accepting never applies it): a nuisance parameter, so that a miscalibrated station is not made up for by
 *   wrong reflectances and albedo; a value away from 1 says the station wants checking.
 * The bounds hold a survey taken with ordinary care (horizon heights to a few degrees, facade orientation from a map,
 * reflectance from a glazing sheet: common practice) with room to spare; a fit that ends on one says so.
 * Angles in degrees (azimuth clockwise from north), reflectances and albedo as fractions.
 */
import type { SiteSurvey } from '../contracts/survey';

/** Width of a horizon sector [°]. */
export const HORIZON_SECTOR_DEG = 30;

export type CorrectionKind = 'albedo' | 'reflectance' | 'facadeAzimuth' | 'horizonSector' | 'stationScale';

export interface CorrectionParameter {
  /** Stable key: `albedo`, `reflectors.0.reflectance`, `reflectors.0.normalAzimuthDeg`, `horizon.90-120`, `station.scale`. */
  key: string;
  kind: CorrectionKind;
  /** What a person reads: "Facade 1 reflectance", "Horizon 90–120° (mean height)". */
  label: string;
  unit: '' | '°';
  /** The surveyed value. */
  value: number;
  lower: number;
  upper: number;
  /** Forward-difference step for the Jacobian. */
  stepSize: number;
  /** Facade index, or the horizon point indices of a sector. */
  reflector?: number;
  points?: number[];
}

const clamp = (x: number, lo: number, hi: number) => Math.min(hi, Math.max(lo, x));
const wrap360 = (a: number) => ((a % 360) + 360) % 360;

/** The parameters a survey offers (see the module comment for their bounds). */
export function correctionParameters(survey: SiteSurvey, albedo: number): CorrectionParameter[] {
  const out: CorrectionParameter[] = [
    {
      key: 'albedo',
      kind: 'albedo',
      label: 'Ground albedo',
      unit: '',
      value: albedo,
      // The surveyed value is always inside its own bounds, even where it lies outside 0.02…0.9.
      lower: Math.min(albedo, clamp(albedo - 0.2, 0.02, 0.9)),
      upper: Math.max(albedo, clamp(albedo + 0.2, 0.02, 0.9)),
      stepSize: 0.01,
    },
  ];
  out.push({
    key: 'station.scale',
    kind: 'stationScale',
    label: 'Weather-station scale (not part of the survey)',
    unit: '',
    value: 1,
    lower: 0.8,
    upper: 1.2,
    stepSize: 0.005,
  });
  survey.reflectors.forEach((r, i) => {
    out.push({
      key: `reflectors.${i}.reflectance`,
      kind: 'reflectance',
      label: `Facade ${i + 1} reflectance`,
      unit: '',
      value: r.reflectance,
      lower: Math.max(0, r.reflectance - 0.3),
      upper: Math.min(1, r.reflectance + 0.3),
      stepSize: 0.01,
      reflector: i,
    });
    out.push({
      key: `reflectors.${i}.normalAzimuthDeg`,
      kind: 'facadeAzimuth',
      label: `Facade ${i + 1} azimuth (normal)`,
      unit: '°',
      value: r.normalAzimuthDeg,
      lower: r.normalAzimuthDeg - 15,
      upper: r.normalAzimuthDeg + 15,
      stepSize: 0.5,
      reflector: i,
    });
  });
  for (let from = 0; from < 360; from += HORIZON_SECTOR_DEG) {
    const to = from + HORIZON_SECTOR_DEG;
    const points = survey.horizon.map((p, i) => (p[0] >= from && p[0] < to ? i : -1)).filter((i) => i >= 0);
    if (!points.length) continue;
    const mean = points.reduce((s, i) => s + survey.horizon[i]![1], 0) / points.length;
    out.push({
      key: `horizon.${from}-${to}`,
      kind: 'horizonSector',
      label: `Horizon ${from}–${to}° (mean height)`,
      unit: '°',
      value: mean,
      lower: Math.max(0, mean - 10),
      upper: Math.min(90, mean + 10),
      stepSize: 0.5,
      points,
    });
  }
  return out;
}

/** The survey and albedo with the parameters set to `values` (one per parameter, in order; the station scale is not the survey's). */
export function applyCorrections(
  survey: SiteSurvey,
  params: readonly CorrectionParameter[],
  values: readonly number[],
): { survey: SiteSurvey; albedo: number } {
  if (values.length !== params.length) throw new RangeError(`values: expected ${params.length}, got ${values.length}`);
  let albedo = NaN;
  const reflectors = survey.reflectors.map((r) => ({ ...r }));
  const horizon = survey.horizon.map((p) => [p[0], p[1]] as [number, number]);
  params.forEach((p, k) => {
    const v = values[k]!;
    if (!Number.isFinite(v)) throw new RangeError(`${p.key}: must be a finite number; got ${v}`);
    if (p.kind === 'albedo') albedo = v;
    else if (p.kind === 'stationScale') return;
    else if (p.kind === 'reflectance') reflectors[p.reflector!]!.reflectance = clamp(v, 0, 1);
    else if (p.kind === 'facadeAzimuth') reflectors[p.reflector!]!.normalAzimuthDeg = wrap360(v);
    else {
      const shift = v - p.value;
      for (const i of p.points!) horizon[i]![1] = clamp(survey.horizon[i]![1] + shift, 0, 90);
    }
  });
  if (Number.isNaN(albedo)) throw new RangeError('params: must include albedo');
  return { survey: { ...survey, horizon, reflectors }, albedo };
}

/** The station scale among `values` (1 when the parameters have none). */
export function stationScaleOf(params: readonly CorrectionParameter[], values: readonly number[]): number {
  const k = params.findIndex((p) => p.kind === 'stationScale');
  return k < 0 ? 1 : values[k]!;
}
