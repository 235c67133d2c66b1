/**
 * Resolve a sky file into a built sky: sun position from SPA (site + time) unless given; magnitudes from what was
 * measured, in this order:
 *   GHI and DHI measured → DNI = (GHI − DHI)/cos Z;
 *   GHI only            → Erbs et al. 1982 split (clearness index against the extraterrestrial irradiance of the day);
 *   DHI only            → DNI from the Ineichen–Perez 2002 clear sky (site altitude, Linke turbidity);
 *   nothing             → Ineichen–Perez clear sky for GHI, DNI and DHI;
 *   sun.dniWm2 given    → used as is; DHI = measured DHI, else GHI − DNI·cos Z, else clear-sky DHI.
 * DNI is 0 for a sun below the horizon and for zenith > 87° when derived by division. Without sun and site/time the sky
 * has no sun (indoor or night): DHI defaults to 0 and GHI to DHI.
 */
import { clearSkyIneichenPerez } from '../clear-sky/ineichen-perez-2002';
import { erbsSplit } from '../clear-sky/erbs-1982';
import { absoluteAirMass, relativeAirMassKastenYoung } from '../clear-sky/air-mass-kasten-young-1989';
import { dayOfYearUtc, extraterrestrialNormalIrradianceWm2, SOLAR_CONSTANT_WM2 } from '../clear-sky/extraterrestrial-irradiance';
import { parseInstant } from '../solar-position/instant';
import { solarPosition, standardPressureHpa } from '../solar-position/index';
import { buildSky, type Sky, type SkyInput } from '../sky-radiance/sky';
import { parseSkyFile, type SkyFile } from './sky-file-schema';

export interface ResolvedSky {
  sky: Sky;
  input: SkyInput;
  /** How the magnitudes were obtained, in words. */
  magnitudeSource: string;
  /** Where the sun position came from. */
  sunSource: 'sky file' | 'SPA' | 'none';
}

export function resolveSkyFile(file: SkyFile): ResolvedSky {
  const elevationM = file.site?.elevationM ?? 0;
  const pressureHpa = file.pressureHpa ?? standardPressureHpa(elevationM);
  let sunAz: number | null = null;
  let sunEl = 0;
  let sunSource: ResolvedSky['sunSource'] = 'none';
  const unixMs: number | null = file.time ? parseInstant(file.time).unixMs : null;
  if (file.sun) {
    sunAz = file.sun.azimuthDeg;
    sunEl = file.sun.elevationDeg;
    sunSource = 'sky file';
  } else if (file.site && unixMs !== null) {
    const p = solarPosition(file.site, unixMs, { pressureHpa, temperatureC: file.temperatureC, deltaTS: file.deltaTS });
    sunAz = p.azimuthDeg;
    sunEl = p.elevationDeg;
    sunSource = 'SPA';
  }
  if (sunAz === null) {
    const dhi = file.dhiWm2 ?? 0;
    const input: SkyInput = {
      sun: null,
      dhiWm2: dhi,
      ghiWm2: file.ghiWm2 ?? dhi,
      skyType: file.skyType,
      albedo: file.albedo,
      horizon: file.horizon,
      reflectors: file.reflectors,
      lamps: file.lamps,
    };
    return { sky: buildSky(input), input, magnitudeSource: 'no sun: measured DHI (default 0)', sunSource };
  }
  const zenithDeg = 90 - sunEl;
  const cosZ = Math.cos((zenithDeg * Math.PI) / 180);
  const i0 = unixMs !== null ? extraterrestrialNormalIrradianceWm2(dayOfYearUtc(unixMs)) : SOLAR_CONSTANT_WM2;
  const clear = () =>
    clearSkyIneichenPerez({
      apparentZenithDeg: zenithDeg,
      absoluteAirMass: absoluteAirMass(relativeAirMassKastenYoung(zenithDeg), pressureHpa),
      linkeTurbidity: file.linkeTurbidity,
      altitudeM: Math.max(0, elevationM),
      extraterrestrialNormalWm2: i0,
    });
  let dni: number;
  let dhi: number;
  let ghi: number | undefined;
  let source: string;
  const up = sunEl > 0;
  const divisible = zenithDeg < 87;
  if (file.sun?.dniWm2 !== undefined) {
    dni = up ? file.sun.dniWm2 : 0;
    if (file.dhiWm2 !== undefined) {
      dhi = file.dhiWm2;
      source = 'given DNI and measured DHI';
    } else if (file.ghiWm2 !== undefined) {
      dhi = Math.max(0, file.ghiWm2 - dni * Math.max(0, cosZ));
      source = 'given DNI, DHI = GHI − DNI·cos Z';
    } else {
      dhi = clear().dhiWm2;
      source = `given DNI, DHI from Ineichen–Perez clear sky (TL ${file.linkeTurbidity})`;
    }
    ghi = file.ghiWm2;
  } else if (file.ghiWm2 !== undefined && file.dhiWm2 !== undefined) {
    ghi = file.ghiWm2;
    dhi = file.dhiWm2;
    dni = up && divisible ? Math.max(0, (ghi - dhi) / cosZ) : 0;
    source = 'measured GHI and DHI';
  } else if (file.ghiWm2 !== undefined) {
    ghi = file.ghiWm2;
    const s = up ? erbsSplit(ghi, zenithDeg, i0) : { dhiWm2: ghi, dniWm2: 0 };
    dhi = s.dhiWm2;
    dni = s.dniWm2;
    source = 'Erbs split of measured GHI';
  } else if (file.dhiWm2 !== undefined) {
    dhi = file.dhiWm2;
    dni = up ? clear().dniWm2 : 0;
    source = `measured DHI, DNI from Ineichen–Perez clear sky (TL ${file.linkeTurbidity})`;
  } else {
    const c = clear();
    dni = c.dniWm2;
    dhi = c.dhiWm2;
    ghi = c.ghiWm2;
    source = `Ineichen–Perez clear sky (TL ${file.linkeTurbidity})`;
  }
  const input: SkyInput = {
    sun: { azimuthDeg: sunAz % 360, elevationDeg: sunEl, dniWm2: Math.min(1500, dni) },
    dhiWm2: Math.min(2000, dhi),
    ghiWm2: ghi,
    skyType: file.skyType,
    albedo: file.albedo,
    horizon: file.horizon,
    reflectors: file.reflectors,
    lamps: file.lamps,
  };
  return { sky: buildSky(input), input, magnitudeSource: source, sunSource };
}

/** Validate a decoded JSON value as a sky file and resolve it. Throws RangeError naming the field. */
export function skyFromFile(value: unknown): ResolvedSky {
  return resolveSkyFile(parseSkyFile(value));
}
