/** Clear-sky models and the global/diffuse split used to set a sky's magnitudes. */
export { clearSkyIneichenPerez, type ClearSkyIrradiance } from './ineichen-perez-2002';
export { clearSkyGhiHaurwitz } from './haurwitz-1945';
export { erbsDiffuseFraction, erbsSplit } from './erbs-1982';
export { relativeAirMassKastenYoung, absoluteAirMass } from './air-mass-kasten-young-1989';
export { extraterrestrialNormalIrradianceWm2, dayOfYearUtc, SOLAR_CONSTANT_WM2 } from './extraterrestrial-irradiance';
