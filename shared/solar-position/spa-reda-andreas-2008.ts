/**
 * NREL Solar Position Algorithm (SPA), full implementation.
 *
 * Source: I. Reda and A. Andreas, "Solar Position Algorithm for Solar Radiation Applications",
 * National Renewable Energy Laboratory, NREL/TP-560-34302, revised January 2008;
 * also Solar Energy 76(5) (2004) 577–589, doi:10.1016/j.solener.2003.12.003, corrigendum Solar Energy 81 (2007) 838.
 * Equation numbers below are the report's (section 3 and Appendix A.2).
 *
 * Stated uncertainty: ±0.0003° in zenith and azimuth for the years −2000 … 6000.
 * Valid input: latitude −90…90°, longitude −180…180° (east positive), elevation ≥ −6,500,000 m (the report's limit),
 * pressure 0…5000 hPa, temperature −273…6000 °C, ΔT −8000…8000 s, instants in years −2000…6000.
 * Instants are taken on the proleptic Gregorian time scale (JavaScript epoch milliseconds), so the report's
 * Julian-calendar branch of eq. 4 is not needed: JD = unixMs/86 400 000 + 2 440 587.5.
 *
 * Conventions (the report's): azimuth Φ eastward from north; hour angle westward from south;
 * surface azimuth rotation γ measured from south, positive toward west.
 */
import { B0, B1, L0, L1, L2, L3, L4, L5, NUTATION_ABCD, NUTATION_Y, R0, R1, R2, R3, R4 } from './spa-periodic-terms-reda-andreas-2008';

const RAD = Math.PI / 180;
const DEG = 180 / Math.PI;

/** Inputs of one SPA evaluation. */
export interface SpaInput {
  /** The instant, milliseconds since 1970-01-01T00:00:00Z (UTC). */
  unixMs: number;
  /** ΔUT1 = UT1 − UTC in seconds (|ΔUT1| < 1 s); default 0. */
  deltaUt1S?: number;
  /** ΔT = TT − UT1 in seconds. */
  deltaTS: number;
  latitudeDeg: number;
  /** East positive. */
  longitudeDeg: number;
  elevationM: number;
  /** Annual average local pressure (hPa = mbar). */
  pressureHpa: number;
  temperatureC: number;
  /** Atmospheric refraction at sunrise and sunset; the report's default 0.5667°. */
  atmosphericRefractionDeg?: number;
  /** Surface slope from horizontal (for the incidence angle, eq. 47). */
  surfaceSlopeDeg?: number;
  /** Surface azimuth rotation, measured from south, positive toward west (the report's γ). */
  surfaceAzimuthRotationDeg?: number;
}

/** Every intermediate of the algorithm, in the report's order and units. */
export interface SpaResult {
  julianDay: number;
  julianEphemerisDay: number;
  julianCentury: number;
  julianEphemerisCentury: number;
  julianEphemerisMillennium: number;
  heliocentricLongitudeDeg: number;
  heliocentricLatitudeDeg: number;
  earthRadiusVectorAu: number;
  geocentricLongitudeDeg: number;
  geocentricLatitudeDeg: number;
  /** X0 … X4 of eqs. 15–19 (degrees). */
  nutationArgumentsDeg: [number, number, number, number, number];
  nutationLongitudeDeg: number;
  nutationObliquityDeg: number;
  meanObliquityArcsec: number;
  trueObliquityDeg: number;
  aberrationCorrectionDeg: number;
  apparentSunLongitudeDeg: number;
  meanSiderealTimeDeg: number;
  apparentSiderealTimeDeg: number;
  geocentricRightAscensionDeg: number;
  geocentricDeclinationDeg: number;
  observerHourAngleDeg: number;
  equatorialHorizontalParallaxDeg: number;
  parallaxRightAscensionDeg: number;
  topocentricRightAscensionDeg: number;
  topocentricDeclinationDeg: number;
  topocentricHourAngleDeg: number;
  /** e0: topocentric elevation without refraction. */
  elevationNoRefractionDeg: number;
  /** Δe: refraction correction (0 when the sun is below −(0.26667° + refraction at the horizon)). */
  refractionCorrectionDeg: number;
  elevationDeg: number;
  zenithDeg: number;
  /** Γ: astronomers' azimuth, westward from south. */
  astronomersAzimuthDeg: number;
  /** Φ: azimuth eastward from north (= clockwise from north). */
  azimuthDeg: number;
  /** I: incidence angle on the surface, when a slope was given. */
  incidenceDeg: number | null;
  /** Equation of time E, minutes (A.1). */
  equationOfTimeMin: number;
}

/** Limit degrees to [0, 360). */
export function limitDegrees(x: number): number {
  const r = x % 360;
  return r < 0 ? r + 360 : r;
}

function limitDegrees180pm(x: number): number {
  let r = limitDegrees(x);
  if (r > 180) r -= 360;
  return r;
}

function limitZeroToOne(x: number): number {
  const r = x - Math.floor(x);
  return r;
}

function sumTerms(terms: readonly (readonly [number, number, number])[], jme: number): number {
  let s = 0;
  for (const [a, b, c] of terms) s += a * Math.cos(b + c * jme);
  return s;
}

/** Eq. 4 via the epoch: Julian day of an instant (UT), with ΔUT1 in seconds. */
export function julianDayFromUnixMs(unixMs: number, deltaUt1S = 0): number {
  return (unixMs + deltaUt1S * 1000) / 86_400_000 + 2_440_587.5;
}

/** Eqs. 9–14: heliocentric longitude L (deg, 0…360), latitude B (deg) and radius vector R (AU). */
export function earthHeliocentric(jme: number): { lDeg: number; bDeg: number; rAu: number } {
  const lRad =
    (sumTerms(L0, jme) +
      jme *
        (sumTerms(L1, jme) + jme * (sumTerms(L2, jme) + jme * (sumTerms(L3, jme) + jme * (sumTerms(L4, jme) + jme * sumTerms(L5, jme)))))) /
    1e8;
  const bRad = (sumTerms(B0, jme) + jme * sumTerms(B1, jme)) / 1e8;
  const rAu =
    (sumTerms(R0, jme) + jme * (sumTerms(R1, jme) + jme * (sumTerms(R2, jme) + jme * (sumTerms(R3, jme) + jme * sumTerms(R4, jme))))) / 1e8;
  return { lDeg: limitDegrees(lRad * DEG), bDeg: bRad * DEG, rAu };
}

/** Eqs. 15–23: nutation arguments X0…X4 and the nutation in longitude Δψ and obliquity Δε (degrees). */
export function nutation(jce: number): { x: [number, number, number, number, number]; deltaPsiDeg: number; deltaEpsilonDeg: number } {
  const j2 = jce * jce;
  const j3 = j2 * jce;
  const x: [number, number, number, number, number] = [
    297.85036 + 445267.11148 * jce - 0.0019142 * j2 + j3 / 189474,
    357.52772 + 35999.05034 * jce - 0.0001603 * j2 - j3 / 300000,
    134.96298 + 477198.867398 * jce + 0.0086972 * j2 + j3 / 56250,
    93.27191 + 483202.017538 * jce - 0.0036825 * j2 + j3 / 327270,
    125.04452 - 1934.136261 * jce + 0.0020708 * j2 + j3 / 450000,
  ];
  let psi = 0;
  let eps = 0;
  for (let i = 0; i < NUTATION_Y.length; i++) {
    const y = NUTATION_Y[i]!;
    const [a, b, c, d] = NUTATION_ABCD[i]!;
    const arg = (x[0] * y[0] + x[1] * y[1] + x[2] * y[2] + x[3] * y[3] + x[4] * y[4]) * RAD;
    psi += (a + b * jce) * Math.sin(arg);
    eps += (c + d * jce) * Math.cos(arg);
  }
  return { x, deltaPsiDeg: psi / 36_000_000, deltaEpsilonDeg: eps / 36_000_000 };
}

/** Eq. 24: mean obliquity of the ecliptic ε0 in arc seconds. */
export function meanObliquityArcsec(jme: number): number {
  const u = jme / 10;
  return (
    84381.448 +
    u *
      (-4680.93 +
        u * (-1.55 + u * (1999.25 + u * (-51.38 + u * (-249.67 + u * (-39.05 + u * (7.12 + u * (27.87 + u * (5.79 + u * 2.45)))))))))
  );
}

/** Geocentric sun quantities that do not depend on the observer (eqs. 4–30). */
export interface SpaGeocentric {
  julianDay: number;
  julianEphemerisDay: number;
  julianCentury: number;
  julianEphemerisCentury: number;
  julianEphemerisMillennium: number;
  heliocentricLongitudeDeg: number;
  heliocentricLatitudeDeg: number;
  earthRadiusVectorAu: number;
  geocentricLongitudeDeg: number;
  geocentricLatitudeDeg: number;
  nutationArgumentsDeg: [number, number, number, number, number];
  nutationLongitudeDeg: number;
  nutationObliquityDeg: number;
  meanObliquityArcsec: number;
  trueObliquityDeg: number;
  aberrationCorrectionDeg: number;
  apparentSunLongitudeDeg: number;
  meanSiderealTimeDeg: number;
  apparentSiderealTimeDeg: number;
  geocentricRightAscensionDeg: number;
  geocentricDeclinationDeg: number;
}

/** Eqs. 4–30 for a Julian day (UT) and ΔT (s). */
export function spaGeocentric(julianDay: number, deltaTS: number): SpaGeocentric {
  const jde = julianDay + deltaTS / 86400; // eq. 5
  const jc = (julianDay - 2451545) / 36525; // eq. 6
  const jce = (jde - 2451545) / 36525; // eq. 7
  const jme = jce / 10; // eq. 8
  const { lDeg, bDeg, rAu } = earthHeliocentric(jme);
  const thetaDeg = limitDegrees(lDeg + 180); // eq. 13
  const betaDeg = -bDeg; // eq. 14
  const { x, deltaPsiDeg, deltaEpsilonDeg } = nutation(jce);
  const eps0 = meanObliquityArcsec(jme);
  const epsDeg = eps0 / 3600 + deltaEpsilonDeg; // eq. 25
  const deltaTauDeg = -20.4898 / (3600 * rAu); // eq. 26
  const lambdaDeg = thetaDeg + deltaPsiDeg + deltaTauDeg; // eq. 27
  const nu0 = limitDegrees(280.46061837 + 360.98564736629 * (julianDay - 2451545) + 0.000387933 * jc * jc - (jc * jc * jc) / 38710000); // eq. 28
  const nu = nu0 + deltaPsiDeg * Math.cos(epsDeg * RAD); // eq. 29
  const lam = lambdaDeg * RAD;
  const eps = epsDeg * RAD;
  const beta = betaDeg * RAD;
  const alphaDeg = limitDegrees(Math.atan2(Math.sin(lam) * Math.cos(eps) - Math.tan(beta) * Math.sin(eps), Math.cos(lam)) * DEG); // eq. 30
  const deltaDeg = Math.asin(Math.sin(beta) * Math.cos(eps) + Math.cos(beta) * Math.sin(eps) * Math.sin(lam)) * DEG; // eq. 31
  return {
    julianDay,
    julianEphemerisDay: jde,
    julianCentury: jc,
    julianEphemerisCentury: jce,
    julianEphemerisMillennium: jme,
    heliocentricLongitudeDeg: lDeg,
    heliocentricLatitudeDeg: bDeg,
    earthRadiusVectorAu: rAu,
    geocentricLongitudeDeg: thetaDeg,
    geocentricLatitudeDeg: betaDeg,
    nutationArgumentsDeg: x,
    nutationLongitudeDeg: deltaPsiDeg,
    nutationObliquityDeg: deltaEpsilonDeg,
    meanObliquityArcsec: eps0,
    trueObliquityDeg: epsDeg,
    aberrationCorrectionDeg: deltaTauDeg,
    apparentSunLongitudeDeg: lambdaDeg,
    meanSiderealTimeDeg: nu0,
    apparentSiderealTimeDeg: nu,
    geocentricRightAscensionDeg: alphaDeg,
    geocentricDeclinationDeg: deltaDeg,
  };
}

/**
 * Eqs. 41–44 without refraction: topocentric elevation e0 and astronomers' azimuth Γ from latitude φ,
 * declination δ′ and hour angle H′ (all degrees). Also the textbook horizon-coordinate transform.
 */
export function horizonCoordinates(
  latitudeDeg: number,
  declinationDeg: number,
  hourAngleDeg: number,
): { elevationDeg: number; astronomersAzimuthDeg: number } {
  const phi = latitudeDeg * RAD;
  const d = declinationDeg * RAD;
  const h = hourAngleDeg * RAD;
  const e0 = Math.asin(Math.sin(phi) * Math.sin(d) + Math.cos(phi) * Math.cos(d) * Math.cos(h)) * DEG; // eq. 41
  const gamma = limitDegrees(Math.atan2(Math.sin(h), Math.cos(h) * Math.sin(phi) - Math.tan(d) * Math.cos(phi)) * DEG); // eq. 45
  return { elevationDeg: e0, astronomersAzimuthDeg: gamma };
}

/** Eq. 42: atmospheric refraction correction Δe (degrees) for e0, pressure (hPa) and temperature (°C). */
export function refractionCorrectionDeg(
  e0Deg: number,
  pressureHpa: number,
  temperatureC: number,
  atmosphericRefractionDeg = 0.5667,
): number {
  if (e0Deg < -(0.26667 + atmosphericRefractionDeg)) return 0;
  return ((pressureHpa / 1010) * (283 / (273 + temperatureC)) * 1.02) / (60 * Math.tan((e0Deg + 10.3 / (e0Deg + 5.11)) * RAD));
}

/** Eq. 47: incidence angle (deg) on a surface of slope ω, azimuth rotation γ (from south, W+), for zenith θ and astronomers' azimuth Γ. */
export function spaIncidenceDeg(
  zenithDeg: number,
  astronomersAzimuthDeg: number,
  slopeDeg: number,
  surfaceAzimuthRotationDeg: number,
): number {
  const th = zenithDeg * RAD;
  const om = slopeDeg * RAD;
  const c = Math.cos(th) * Math.cos(om) + Math.sin(om) * Math.sin(th) * Math.cos((astronomersAzimuthDeg - surfaceAzimuthRotationDeg) * RAD);
  return Math.acos(Math.max(-1, Math.min(1, c))) * DEG;
}

/** A.1: equation of time (minutes) from JME, geocentric right ascension, Δψ and ε. */
export function equationOfTimeMin(jme: number, alphaDeg: number, deltaPsiDeg: number, epsDeg: number): number {
  const m = 280.4664567 + jme * (360007.6982779 + jme * (0.03032028 + jme * (1 / 49931 + jme * (-1 / 15300 + jme * (-1 / 2000000)))));
  let e = 4 * limitDegrees(m - 0.0057183 - alphaDeg + deltaPsiDeg * Math.cos(epsDeg * RAD));
  if (e > 20) e -= 1440;
  else if (e < -20) e += 1440;
  return e;
}

/** The full algorithm (section 3): topocentric zenith and azimuth with refraction, incidence, equation of time. */
export function spaSolarPosition(input: SpaInput): SpaResult {
  const refr = input.atmosphericRefractionDeg ?? 0.5667;
  const jd = julianDayFromUnixMs(input.unixMs, input.deltaUt1S ?? 0);
  const g = spaGeocentric(jd, input.deltaTS);
  const hDeg = limitDegrees(g.apparentSiderealTimeDeg + input.longitudeDeg - g.geocentricRightAscensionDeg); // eq. 32
  const xiDeg = 8.794 / (3600 * g.earthRadiusVectorAu); // eq. 33
  const phi = input.latitudeDeg * RAD;
  const u = Math.atan(0.99664719 * Math.tan(phi)); // eq. 34
  const x = Math.cos(u) + (input.elevationM / 6378140) * Math.cos(phi); // eq. 35
  const y = 0.99664719 * Math.sin(u) + (input.elevationM / 6378140) * Math.sin(phi); // eq. 36
  const xi = xiDeg * RAD;
  const h = hDeg * RAD;
  const delta = g.geocentricDeclinationDeg * RAD;
  const den = Math.cos(delta) - x * Math.sin(xi) * Math.cos(h);
  const dAlpha = Math.atan2(-x * Math.sin(xi) * Math.sin(h), den); // eq. 37
  const dAlphaDeg = dAlpha * DEG;
  const alphaPrimeDeg = g.geocentricRightAscensionDeg + dAlphaDeg; // eq. 38
  const deltaPrimeDeg = Math.atan2((Math.sin(delta) - y * Math.sin(xi)) * Math.cos(dAlpha), den) * DEG; // eq. 39
  const hPrimeDeg = hDeg - dAlphaDeg; // eq. 40
  const { elevationDeg: e0, astronomersAzimuthDeg: gammaDeg } = horizonCoordinates(input.latitudeDeg, deltaPrimeDeg, hPrimeDeg);
  const de = refractionCorrectionDeg(e0, input.pressureHpa, input.temperatureC, refr);
  const e = e0 + de; // eq. 43
  const zenithDeg = 90 - e; // eq. 44
  const azimuthDeg = limitDegrees(gammaDeg + 180); // eq. 46
  const incidenceDeg =
    input.surfaceSlopeDeg === undefined
      ? null
      : spaIncidenceDeg(zenithDeg, gammaDeg, input.surfaceSlopeDeg, input.surfaceAzimuthRotationDeg ?? 0);
  return {
    ...g,
    observerHourAngleDeg: hDeg,
    equatorialHorizontalParallaxDeg: xiDeg,
    parallaxRightAscensionDeg: dAlphaDeg,
    topocentricRightAscensionDeg: alphaPrimeDeg,
    topocentricDeclinationDeg: deltaPrimeDeg,
    topocentricHourAngleDeg: hPrimeDeg,
    elevationNoRefractionDeg: e0,
    refractionCorrectionDeg: de,
    elevationDeg: e,
    zenithDeg,
    astronomersAzimuthDeg: gammaDeg,
    azimuthDeg,
    incidenceDeg,
    equationOfTimeMin: equationOfTimeMin(
      g.julianEphemerisMillennium,
      g.geocentricRightAscensionDeg,
      g.nutationLongitudeDeg,
      g.trueObliquityDeg,
    ),
  };
}

/** Result of Appendix A.2 for one UT day: times as fractions of that day (0…1) and as instants. */
export interface SpaRiseTransitSet {
  /** Sun transit (A.2 eq. A.2.23 onward), fraction of the UT day. */
  transitDayFraction: number;
  sunriseDayFraction: number | null;
  sunsetDayFraction: number | null;
  transitUnixMs: number;
  sunriseUnixMs: number | null;
  sunsetUnixMs: number | null;
  /** Sun's topocentric elevation at transit is not part of A.2; h0 at transit from the interpolated δ′ is. */
  transitElevationDeg: number;
  /** 'normal', or polar day / polar night when |cos H0| > 1. */
  kind: 'normal' | 'sun-always-up' | 'sun-always-down';
}

/**
 * Appendix A.2: sunrise, sun transit and sunset of the UT day that starts at 0 h UT of `utDayStartUnixMs`.
 * As the report notes, the results are on that UT day; at large time-zone offsets an event may belong to
 * the neighbouring local day (see sunEventsOfLocalDay for the local calendar day).
 */
export function spaRiseTransitSet(args: {
  utDayStartUnixMs: number;
  deltaTS: number;
  latitudeDeg: number;
  longitudeDeg: number;
  atmosphericRefractionDeg?: number;
}): SpaRiseTransitSet {
  const refr = args.atmosphericRefractionDeg ?? 0.5667;
  const jd0 = julianDayFromUnixMs(args.utDayStartUnixMs);
  // A.2.1: apparent sidereal time at 0 UT (ΔT = 0); A.2.2: α, δ at 0 TT of the day before, the day, the day after (ΔT = 0).
  const nu = spaGeocentric(jd0, 0).apparentSiderealTimeDeg;
  const pos = [-1, 0, 1].map((k) => spaGeocentric(jd0 + k, 0));
  const alpha = pos.map((p) => p.geocentricRightAscensionDeg);
  const delta = pos.map((p) => p.geocentricDeclinationDeg);
  const sigma = args.longitudeDeg;
  const phi = args.latitudeDeg * RAD;
  const h0Prime = -(0.26667 + refr);
  // A.2.3: approximate transit
  const m0 = (alpha[1]! - sigma - nu) / 360;
  // A.2.4: local hour angle of sunrise/sunset
  const cosH0 = (Math.sin(h0Prime * RAD) - Math.sin(phi) * Math.sin(delta[1]! * RAD)) / (Math.cos(phi) * Math.cos(delta[1]! * RAD));
  const kind: SpaRiseTransitSet['kind'] = cosH0 < -1 ? 'sun-always-up' : cosH0 > 1 ? 'sun-always-down' : 'normal';
  const h0 = kind === 'normal' ? Math.acos(cosH0) * DEG : 0; // in 0…180
  // A.2.5–A.2.6
  const m = [limitZeroToOne(m0), limitZeroToOne(m0 - h0 / 360), limitZeroToOne(m0 + h0 / 360)];
  // A.2.8–A.2.10: interpolation of α, δ (with the report's wrap rule for |a|, |b| ≥ 2)
  const interpolate = (v: number[], n: number): number => {
    let a = v[1]! - v[0]!;
    let b = v[2]! - v[1]!;
    if (Math.abs(a) >= 2) a = limitZeroToOne(a);
    if (Math.abs(b) >= 2) b = limitZeroToOne(b);
    const c = b - a;
    return v[1]! + (n * (a + b + c * n)) / 2;
  };
  const hPrime: number[] = [];
  const deltaPrime: number[] = [];
  const hElev: number[] = [];
  for (let i = 0; i < 3; i++) {
    const nuI = nu + 360.985647 * m[i]!; // A.2.7
    const n = m[i]! + args.deltaTS / 86400; // A.2.8
    const alphaI = interpolate(alpha, n); // A.2.9
    const deltaI = interpolate(delta, n); // A.2.10
    const hp = limitDegrees180pm(nuI + sigma - alphaI); // A.2.11
    hPrime.push(hp);
    deltaPrime.push(deltaI);
    hElev.push(Math.asin(Math.sin(phi) * Math.sin(deltaI * RAD) + Math.cos(phi) * Math.cos(deltaI * RAD) * Math.cos(hp * RAD)) * DEG); // A.2.12
  }
  const transit = m[0]! - hPrime[0]! / 360; // A.2.13
  const riseSet = (i: number): number =>
    m[i]! + (hElev[i]! - h0Prime) / (360 * Math.cos(deltaPrime[i]! * RAD) * Math.cos(phi) * Math.sin(hPrime[i]! * RAD)); // A.2.14–15
  const sunrise = kind === 'normal' ? riseSet(1) : null;
  const sunset = kind === 'normal' ? riseSet(2) : null;
  const toMs = (f: number) => args.utDayStartUnixMs + f * 86_400_000;
  return {
    transitDayFraction: transit,
    sunriseDayFraction: sunrise,
    sunsetDayFraction: sunset,
    transitUnixMs: toMs(transit),
    sunriseUnixMs: sunrise === null ? null : toMs(sunrise),
    sunsetUnixMs: sunset === null ? null : toMs(sunset),
    transitElevationDeg: hElev[0]!,
    kind,
  };
}
