/**
 * Composition of the sky radiance L(direction) seen from a site, with every part the engine models:
 * - sun disc (0.53°) carrying DNI, blocked by the horizon profile (partial disc at the edge);
 * - sky dome shaped by a CIE/ISO standard general sky type 1…15, the traditional CIE overcast sky (Moon–Spencer)
 *   or isotropic, scaled so the unobstructed dome gives exactly DHI on a horizontal plane;
 * - ground below the horizontal, Lambertian with radiance albedo·GHI/π;
 * - horizon profile: between the horizontal and the profile the site sees obstructions, treated like the ground
 *   (Lambertian, albedo·GHI/π), so they block sun and sky;
 * - specular facade reflectors mirroring the sun (closed-form image) and the sky/ground (radiance ρ·L(mirrored));
 *   facades are in front of everything else; their back faces look like obstructions;
 * - point lamps (indoor).
 * The sun, its mirror images and lamps are "sharp" sources handled in closed form by the landscape; everything else
 * is the extended radiance L(direction) returned by `extendedRadiance`.
 */
import { azimuthElevationOf, directionFromAzimuthElevation, dot, type Vec3 } from '../sphere/directions';
import { skyDomeIrradianceOnPlane } from '../sphere/plane-quadrature';
import { cieParameters, cieGradation, cieIndicatrix, type CieParameters } from './cie-standard-general-sky-2003';
import { moonSpencerRelativeLuminance } from './cie-overcast-moon-spencer-1942';
import { buildLamp, type Lamp, type LampInput } from './lamps';
import {
  buildReflector,
  reflectedViewDirection,
  reflectorContains,
  sunImageDirection,
  type Reflector,
  type ReflectorInput,
} from './facade-reflectors';
import { horizonElevationDeg, horizonProfile, type HorizonProfile } from './horizon-profile';
import { SUN_ANGULAR_RADIUS_DEG, sunDiscVisibleFraction } from './sun-disc';

/** 'isotropic', 'moon-spencer' (traditional CIE overcast) or a CIE standard general sky type 1…15. */
export type SkyType = 'isotropic' | 'moon-spencer' | number;

/** A sky with its magnitudes already resolved (see sky-file for deriving them from a site, time and measurements). */
export interface SkyInput {
  /** Sun position and direct normal irradiance; null when there is no sun (night, indoor). */
  sun: { azimuthDeg: number; elevationDeg: number; dniWm2: number } | null;
  /** Diffuse horizontal irradiance of the unobstructed dome, W/m². */
  dhiWm2: number;
  /** Global horizontal irradiance lighting the ground; default DNI·sin(elevation)⁺ + DHI. */
  ghiWm2?: number;
  /** Default 'isotropic'. */
  skyType?: SkyType;
  /** Ground (and obstruction) reflectance 0…1; default 0.2. */
  albedo?: number;
  horizon?: readonly (readonly [number, number])[];
  reflectors?: readonly ReflectorInput[];
  lamps?: readonly LampInput[];
}

/** A sharp source handled in closed form: irradianceWm2 · max(0, n·direction) on a plane with normal n. */
export interface PointSource {
  kind: 'sun' | 'sun-image' | 'lamp';
  direction: Vec3;
  /** Irradiance at normal incidence, after horizon occultation and reflectance. */
  irradianceWm2: number;
}

/** A built sky: immutable description plus precomputed constants. Build with `buildSky`. */
export interface Sky {
  readonly input: Readonly<SkyInput>;
  readonly sunDirection: Vec3 | null;
  readonly sunAzimuthDeg: number;
  readonly sunElevationDeg: number;
  readonly dniWm2: number;
  readonly dhiWm2: number;
  readonly ghiWm2: number;
  readonly albedo: number;
  readonly skyType: SkyType;
  /** Zenith radiance of the dome, W/(m²·sr). */
  readonly zenithRadianceWm2Sr: number;
  /** ∫ (L/Lz) cos Z dΩ over the unobstructed dome (sr); DHI = Lz × this. */
  readonly domeHorizontalIntegralSr: number;
  /** Radiance of ground and obstructions, albedo·GHI/π. */
  readonly groundRadianceWm2Sr: number;
  readonly horizon: HorizonProfile;
  readonly reflectors: readonly Reflector[];
  readonly lamps: readonly Lamp[];
  readonly pointSources: readonly PointSource[];
  /** Relative dome luminance L/Lz for a direction above the horizontal. */
  readonly domeShape: (d: Vec3) => number;
  /** Cache slot for the fast landscape model (filled by the landscape module). */
  readonly cache: Map<string, unknown>;
}

function requireFinite(value: number, field: string, lo: number, hi: number): void {
  if (typeof value !== 'number' || !Number.isFinite(value) || value < lo || value > hi) {
    throw new RangeError(`${field}: must be a finite number in [${lo}, ${hi}]; got ${value}`);
  }
}

function domeShapeFor(skyType: SkyType, sun: Vec3): (d: Vec3) => number {
  if (skyType === 'isotropic') return () => 1;
  if (skyType === 'moon-spencer') return (d) => moonSpencerRelativeLuminance(Math.acos(Math.min(1, d[2])));
  const p: CieParameters = cieParameters(skyType);
  const sunZenith = Math.acos(Math.max(-1, Math.min(1, sun[2])));
  const norm = 1 / (cieIndicatrix(p, sunZenith) * cieGradation(p, 0));
  const ed = Math.exp((p.d * Math.PI) / 2);
  return (d) => {
    const z = d[2];
    const grad = z <= 1e-9 ? 1 : 1 + p.a * Math.exp(p.b / z);
    const cc = Math.max(-1, Math.min(1, d[0] * sun[0] + d[1] * sun[1] + d[2] * sun[2]));
    const chi = Math.acos(cc);
    const ind = 1 + p.c * (Math.exp(p.d * chi) - ed) + p.e * cc * cc;
    return ind * grad * norm;
  };
}

/** Validate and build a sky. Throws RangeError naming the offending field. */
export function buildSky(input: SkyInput): Sky {
  const skyType = input.skyType ?? 'isotropic';
  if (!(
    skyType === 'isotropic' ||
    skyType === 'moon-spencer' ||
    (typeof skyType === 'number' && Number.isInteger(skyType) && skyType >= 1 && skyType <= 15)
  )) {
    throw new RangeError(`skyType: must be "isotropic", "moon-spencer" or an integer 1…15; got ${JSON.stringify(skyType)}`);
  }
  requireFinite(input.dhiWm2, 'dhiWm2', 0, 2000);
  const albedo = input.albedo ?? 0.2;
  requireFinite(albedo, 'albedo', 0, 1);
  let sunDirection: Vec3 | null = null;
  let dni = 0;
  if (input.sun) {
    requireFinite(input.sun.azimuthDeg, 'sun.azimuthDeg', 0, 360);
    requireFinite(input.sun.elevationDeg, 'sun.elevationDeg', -90, 90);
    requireFinite(input.sun.dniWm2, 'sun.dniWm2', 0, 1500);
    sunDirection = directionFromAzimuthElevation(input.sun.azimuthDeg, input.sun.elevationDeg);
    dni = input.sun.dniWm2;
  }
  const ghi = input.ghiWm2 ?? dni * Math.max(0, sunDirection ? sunDirection[2] : 0) + input.dhiWm2;
  requireFinite(ghi, 'ghiWm2', 0, 2500);
  const horizon = horizonProfile(input.horizon ?? []);
  const reflectors = (input.reflectors ?? []).map((r, i) => {
    const f = `reflectors[${i}]`;
    requireFinite(r.normalAzimuthDeg, `${f}.normalAzimuthDeg`, 0, 360);
    requireFinite(r.normalElevationDeg ?? 0, `${f}.normalElevationDeg`, -90, 90);
    requireFinite(r.azimuthFromDeg, `${f}.azimuthFromDeg`, 0, 360);
    requireFinite(r.azimuthToDeg, `${f}.azimuthToDeg`, 0, 360);
    requireFinite(r.elevationFromDeg, `${f}.elevationFromDeg`, -90, 90);
    requireFinite(r.elevationToDeg, `${f}.elevationToDeg`, -90, 90);
    requireFinite(r.reflectance, `${f}.reflectance`, 0, 1);
    return buildReflector(r);
  });
  const lamps = (input.lamps ?? []).map((l, i) => {
    requireFinite(l.azimuthDeg, `lamps[${i}].azimuthDeg`, 0, 360);
    requireFinite(l.elevationDeg, `lamps[${i}].elevationDeg`, -90, 90);
    requireFinite(l.irradianceWm2, `lamps[${i}].irradianceWm2`, 0, 10000);
    return buildLamp(l);
  });
  const shapeSun: Vec3 = sunDirection ?? [0, 0, 1];
  const domeShape = domeShapeFor(skyType, shapeSun);
  const domeHorizontalIntegralSr = skyDomeIrradianceOnPlane(
    (z, a) => domeShape([Math.sin(z) * Math.sin(a), Math.sin(z) * Math.cos(a), Math.cos(z)]),
    0,
    0,
    96,
  );
  const zenithRadianceWm2Sr = input.dhiWm2 / domeHorizontalIntegralSr;
  const pointSources: PointSource[] = [];
  if (sunDirection && dni > 0 && input.sun) {
    const edge = Math.max(0, horizonElevationDeg(horizon, input.sun.azimuthDeg));
    const visible = sunDiscVisibleFraction(input.sun.elevationDeg - edge);
    // the sun's own disc is hidden where a facade stands in front of it
    const behindFacade = reflectors.some((r) => reflectorContains(r, input.sun!.azimuthDeg, input.sun!.elevationDeg));
    if (visible > 0 && !behindFacade) pointSources.push({ kind: 'sun', direction: sunDirection, irradianceWm2: dni * visible });
    for (const r of reflectors) {
      const img = sunImageDirection(r, sunDirection, azimuthElevationOf);
      if (img) pointSources.push({ kind: 'sun-image', direction: img, irradianceWm2: r.reflectance * dni });
    }
  }
  for (const l of lamps)
    if (l.irradianceWm2 > 0) pointSources.push({ kind: 'lamp', direction: l.direction, irradianceWm2: l.irradianceWm2 });
  return {
    input,
    sunDirection,
    sunAzimuthDeg: input.sun?.azimuthDeg ?? 0,
    sunElevationDeg: input.sun?.elevationDeg ?? -90,
    dniWm2: dni,
    dhiWm2: input.dhiWm2,
    ghiWm2: ghi,
    albedo,
    skyType,
    zenithRadianceWm2Sr,
    domeHorizontalIntegralSr,
    groundRadianceWm2Sr: (albedo * ghi) / Math.PI,
    horizon,
    reflectors,
    lamps,
    pointSources,
    domeShape,
    cache: new Map(),
  };
}

/** Radiance of the unobstructed environment (dome above the horizontal, ground below), as a facade mirrors it. */
export function environmentRadiance(sky: Sky, d: Vec3): number {
  return d[2] > 0 ? sky.zenithRadianceWm2Sr * sky.domeShape(d) : sky.groundRadianceWm2Sr;
}

/** Radiance seen through reflector r along v (ρ·L(mirrored)), or the obstruction radiance for its back face. */
export function reflectorRadiance(sky: Sky, r: Reflector, v: Vec3): number {
  const m = reflectedViewDirection(r, v);
  return m ? r.reflectance * environmentRadiance(sky, m) : sky.groundRadianceWm2Sr;
}

/** Extended radiance L(direction) seen from the site, W/(m²·sr): everything except the closed-form point sources. */
export function extendedRadiance(sky: Sky, d: Vec3): number {
  if (sky.reflectors.length > 0) {
    const { azimuthDeg, elevationDeg } = azimuthElevationOf(d);
    for (const r of sky.reflectors) if (reflectorContains(r, azimuthDeg, elevationDeg)) return reflectorRadiance(sky, r, d);
    if (d[2] <= 0) return sky.groundRadianceWm2Sr;
    if (!sky.horizon.empty && elevationDeg < horizonElevationDeg(sky.horizon, azimuthDeg)) return sky.groundRadianceWm2Sr;
    return sky.zenithRadianceWm2Sr * sky.domeShape(d);
  }
  if (d[2] <= 0) return sky.groundRadianceWm2Sr;
  if (!sky.horizon.empty) {
    const { azimuthDeg, elevationDeg } = azimuthElevationOf(d);
    if (elevationDeg < horizonElevationDeg(sky.horizon, azimuthDeg)) return sky.groundRadianceWm2Sr;
  }
  return sky.zenithRadianceWm2Sr * sky.domeShape(d);
}

/** Closed-form irradiance of the point sources on a plane with unit normal n. */
export function pointSourceIrradiance(sky: Sky, n: Vec3): number {
  let e = 0;
  for (const p of sky.pointSources) {
    const c = dot(n, p.direction);
    if (c > 0) e += p.irradianceWm2 * c;
  }
  return e;
}

export { SUN_ANGULAR_RADIUS_DEG };
