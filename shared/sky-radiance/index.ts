/** Sky radiance model: build a sky, query its radiance and its closed-form sources. */
export {
  buildSky,
  extendedRadiance,
  environmentRadiance,
  reflectorRadiance,
  pointSourceIrradiance,
  type Sky,
  type SkyInput,
  type SkyType,
  type PointSource,
} from './sky';
export { cieRelativeLuminance, cieParameters, CIE_SKY_TYPES, CIE_GRADATION, CIE_INDICATRIX } from './cie-standard-general-sky-2003';
export { moonSpencerRelativeLuminance } from './cie-overcast-moon-spencer-1942';
export { horizonProfile, horizonElevationDeg, horizonMeanElevationDeg, type HorizonProfile } from './horizon-profile';
export { buildReflector, reflectorContains, type Reflector, type ReflectorInput } from './facade-reflectors';
export { buildLamp, type Lamp, type LampInput } from './lamps';
export { sunDiscVisibleFraction, SUN_ANGULAR_RADIUS_DEG } from './sun-disc';
export { perezSkyDiffuse, PEREZ_1990_COEFFICIENTS, type PerezResult } from './transposition-perez-1990';
export { sunNearEdge, sunSeenFromSite } from './sun-visibility';
