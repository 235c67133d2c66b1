/**
 * `brightward` — the engineer's command line for the irradiance landscape engine.
 *
 *   brightward sun --lat <deg> --lon <deg> --time <ISO 8601 with offset> [--elev <m>] [--pressure <hPa>]
 *                  [--temp <°C>] [--delta-t <s>] [--delta-ut1 <s>] [--slope <deg> --surface-azimuth <deg clockwise from north>]
 *   brightward landscape --sky <file.json> [--step <deg>] [--detector-tilt <deg>]
 *   brightward kpi --p0-kwp <kWp> --hi-kwh-m2 <kWh/m²> --eout-kwh <kWh> [--gamma-pct-per-k <%/K> --tmod-c <°C>]
 *
 * JSON on stdout; errors on stderr (one line naming the field and the allowed range) with exit code 2 for bad
 * input and 1 for anything else. No output ever contains NaN or Infinity.
 */
import { readFileSync } from 'node:fs';
import { parseArgs } from 'node:util';
import { analyseLandscape } from '../landscape/index';
import { yieldsOf } from '../pv-performance/yields-iec-61724-1';
import { skyFromFile } from '../sky-file/index';
import {
  formatInstant,
  incidenceAngleDeg,
  MAX_ABS_DELTA_UT1_S,
  parseInstant,
  solarPosition,
  spaEventsForLocalDate,
  sunEventsOfLocalDay,
} from '../solar-position/index';

class InputError extends Error {}

const USAGE = `usage:
  brightward sun --lat <deg> --lon <deg> --time <ISO 8601 with offset> [--elev <m>] [--pressure <hPa>] [--temp <°C>] [--delta-t <s>] [--delta-ut1 <s>] [--slope <deg> --surface-azimuth <deg>]
  brightward landscape --sky <file.json> [--step <deg>] [--detector-tilt <deg>]
  brightward kpi --p0-kwp <kWp> --hi-kwh-m2 <kWh/m²> --eout-kwh <kWh> [--gamma-pct-per-k <%/K> --tmod-c <°C>]`;

function numberOption(
  values: Record<string, unknown>,
  name: string,
  lo: number,
  hi: number,
  fallback?: number,
  exclusiveLo = false,
): number {
  const raw = values[name];
  if (raw === undefined) {
    if (fallback === undefined) throw new InputError(`--${name}: required`);
    return fallback;
  }
  const text = String(raw).trim();
  const v = text === '' ? NaN : Number(text);
  const range = `${exclusiveLo ? '(' : '['}${lo}, ${hi}]`;
  if (!Number.isFinite(v)) throw new InputError(`--${name}: must be a finite number in ${range}; got ${JSON.stringify(raw)}`);
  if ((exclusiveLo ? v <= lo : v < lo) || v > hi) throw new InputError(`--${name}: must be in ${range}; got ${v}`);
  return v;
}

/**
 * UT1 − UTC [s]: leap seconds keep it within 0.9 s, so a larger value is a mistake (ΔT given here, or milliseconds),
 * and the message says what the option means.
 */
function deltaUt1Option(values: Record<string, unknown>): number {
  try {
    return numberOption(values, 'delta-ut1', -MAX_ABS_DELTA_UT1_S, MAX_ABS_DELTA_UT1_S);
  } catch (e) {
    throw new InputError(
      `${(e as Error).message} (UT1 − UTC in seconds, within ±${MAX_ABS_DELTA_UT1_S} s: leap seconds keep UTC that close to UT1; ΔT = TT − UT1 is --delta-t)`,
    );
  }
}

/** Round for output and refuse non-finite numbers anywhere. */
function toJson(value: unknown): string {
  return JSON.stringify(
    value,
    (key, v) => {
      if (typeof v === 'number') {
        if (!Number.isFinite(v)) throw new Error(`internal error: non-finite number in output field "${key}"`);
        return Math.round(v * 1e6) / 1e6;
      }
      return v;
    },
    2,
  );
}

function runSun(args: string[]): unknown {
  const { values } = parseArgs({
    args,
    options: {
      lat: { type: 'string' },
      lon: { type: 'string' },
      time: { type: 'string' },
      elev: { type: 'string' },
      pressure: { type: 'string' },
      temp: { type: 'string' },
      'delta-t': { type: 'string' },
      'delta-ut1': { type: 'string' },
      slope: { type: 'string' },
      'surface-azimuth': { type: 'string' },
    },
    strict: true,
    allowPositionals: false,
  });
  const latitudeDeg = numberOption(values, 'lat', -90, 90);
  const longitudeDeg = numberOption(values, 'lon', -180, 180);
  if (values.time === undefined) throw new InputError('--time: required (ISO 8601 instant with an offset, e.g. 2003-10-17T12:30:30-07:00)');
  let instant;
  try {
    instant = parseInstant(values.time, '--time');
  } catch (e) {
    throw new InputError((e as Error).message);
  }
  const elevationM = numberOption(values, 'elev', -500, 9000, 0);
  const site = { latitudeDeg, longitudeDeg, elevationM };
  const options = {
    pressureHpa: values.pressure === undefined ? undefined : numberOption(values, 'pressure', 300, 1100),
    temperatureC: values.temp === undefined ? undefined : numberOption(values, 'temp', -90, 60),
    deltaTS: values['delta-t'] === undefined ? undefined : numberOption(values, 'delta-t', -8000, 8000),
    deltaUt1S: values['delta-ut1'] === undefined ? undefined : deltaUt1Option(values),
  };
  const hasSlope = values.slope !== undefined;
  const hasAz = values['surface-azimuth'] !== undefined;
  if (hasSlope !== hasAz)
    throw new InputError(
      `${hasSlope ? '--surface-azimuth' : '--slope'}: required together with ${hasSlope ? '--slope' : '--surface-azimuth'}`,
    );
  const p = solarPosition(site, instant.unixMs, options);
  const out: Record<string, unknown> = {
    zenithDeg: p.zenithDeg,
    azimuthDeg: p.azimuthDeg,
    elevationDeg: p.elevationDeg,
    zenithNoRefractionDeg: p.zenithNoRefractionDeg,
    elevationNoRefractionDeg: p.elevationNoRefractionDeg,
    refractionDeg: p.spa.refractionCorrectionDeg,
  };
  if (hasSlope) {
    const slope = numberOption(values, 'slope', 0, 180);
    const surfaceAzimuth = numberOption(values, 'surface-azimuth', 0, 360);
    out.incidenceDeg = incidenceAngleDeg(p.zenithDeg, p.azimuthDeg, slope, surfaceAzimuth);
  }
  const ev = sunEventsOfLocalDay(site, instant.unixMs, instant.offsetMinutes, { deltaTS: p.deltaTS, deltaUt1S: p.deltaUt1S });
  const fmt = (ms: number | null) => (ms === null ? null : formatInstant(ms, instant.offsetMinutes));
  const a2 = spaEventsForLocalDate(site, instant.unixMs, instant.offsetMinutes, p.deltaTS);
  Object.assign(out, {
    sunrise: fmt(ev.sunriseUnixMs),
    transit: fmt(ev.transitUnixMs),
    sunset: fmt(ev.sunsetUnixMs),
    day: formatInstant(ev.dayStartUnixMs, instant.offsetMinutes).slice(0, 10),
    dayKind: ev.kind,
    riseSetNote:
      'sunrise, transit and sunset of the local calendar day of --time (root-finding on SPA; rise/set at topocentric elevation −0.8333°)',
    spaAppendixA2: {
      note: 'SPA Appendix A.2 on the UT day of the same date; its sunset may be the previous local evening',
      sunrise: fmt(a2.sunriseUnixMs),
      transit: fmt(a2.transitUnixMs),
      sunset: fmt(a2.sunsetUnixMs),
    },
    declinationDeg: p.declinationDeg,
    equationOfTimeMin: p.equationOfTimeMin,
    earthSunDistanceAu: p.earthSunDistanceAu,
    deltaTS: p.deltaTS,
    deltaUt1S: p.deltaUt1S,
    pressureHpa: p.pressureHpa,
    temperatureC: p.temperatureC,
    time: formatInstant(instant.unixMs, instant.offsetMinutes),
  });
  return out;
}

function runLandscape(args: string[]): unknown {
  const { values } = parseArgs({
    args,
    options: {
      sky: { type: 'string' },
      step: { type: 'string' },
      'detector-tilt': { type: 'string' },
      'max-detector-tilt': { type: 'string' },
    },
    strict: true,
    allowPositionals: false,
  });
  if (values.sky === undefined) throw new InputError('--sky: required (path to a sky file, JSON)');
  const stepDeg = numberOption(values, 'step', 0, 10, 1, true);
  const detectorTiltDeg = numberOption(values, 'detector-tilt', 0, 45, 0);
  const maxDetectorTiltDeg = numberOption(values, 'max-detector-tilt', 0.5, 45, 30);
  let text: string;
  try {
    text = readFileSync(values.sky, 'utf8');
  } catch (e) {
    throw new InputError(`--sky: cannot read ${JSON.stringify(values.sky)} (${(e as NodeJS.ErrnoException).code ?? 'error'})`);
  }
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch (e) {
    throw new InputError(`--sky: not valid JSON (${(e as Error).message})`);
  }
  let resolved;
  try {
    resolved = skyFromFile(json);
  } catch (e) {
    if (e instanceof RangeError) throw new InputError(`sky file ${values.sky}: ${e.message}`);
    throw e;
  }
  const report = analyseLandscape(resolved.sky, { stepDeg, detectorTiltDeg, maxDetectorTiltDeg });
  const s = resolved.sky;
  return {
    globalMax: report.globalMax,
    localMaxima: report.localMaxima,
    minSinglePeakDetectorTiltDeg: report.minSinglePeakDetectorTiltDeg,
    detectorTiltDeg: report.detectorTiltDeg,
    maxDetectorTiltDeg,
    stepDeg: report.stepDeg,
    minProminenceWm2: report.minProminenceWm2,
    sky: {
      sunAzimuthDeg: s.sunDirection ? s.sunAzimuthDeg : null,
      sunElevationDeg: s.sunDirection ? s.sunElevationDeg : null,
      sunSource: resolved.sunSource,
      dniWm2: s.dniWm2,
      dhiWm2: s.dhiWm2,
      ghiWm2: s.ghiWm2,
      magnitudeSource: resolved.magnitudeSource,
      skyType: s.skyType,
      albedo: s.albedo,
    },
  };
}

/** IEC 61724-1 yields and PR of one period, by the same functions the monthly statements use. */
function runKpi(args: string[]): unknown {
  const { values } = parseArgs({
    args,
    options: {
      'p0-kwp': { type: 'string' },
      'hi-kwh-m2': { type: 'string' },
      'eout-kwh': { type: 'string' },
      'gamma-pct-per-k': { type: 'string' },
      'tmod-c': { type: 'string' },
    },
    strict: true,
    allowPositionals: false,
  });
  const p0Kwp = numberOption(values, 'p0-kwp', 0, 1e9, undefined, true);
  const hiKwhM2 = numberOption(values, 'hi-kwh-m2', 0, 1e6);
  const eoutKwh = numberOption(values, 'eout-kwh', 0, 1e12);
  const hasGamma = values['gamma-pct-per-k'] !== undefined;
  const hasT = values['tmod-c'] !== undefined;
  if (hasGamma !== hasT)
    throw new InputError(
      `${hasGamma ? '--tmod-c' : '--gamma-pct-per-k'}: required together with ${hasGamma ? '--gamma-pct-per-k' : '--tmod-c'}`,
    );
  const gammaPctPerK = hasGamma ? numberOption(values, 'gamma-pct-per-k', -5, 5) : undefined;
  const tmodC = hasT ? numberOption(values, 'tmod-c', -60, 120) : undefined;
  const y = yieldsOf({ p0Kwp, hiKwhM2, eoutKwh, ...(gammaPctPerK !== undefined ? { gammaPerK: gammaPctPerK / 100, tmodC } : {}) });
  return { yrH: y.yrH, yfH: y.yfH, pr: y.pr, prTempCorrected: y.prTempCorrected };
}

/** Let option values be negative numbers written as a separate word (`--lon -105.18`), which parseArgs would refuse. */
function joinNegativeValues(args: string[]): string[] {
  const out: string[] = [];
  for (let i = 0; i < args.length; i++) {
    const a = args[i]!;
    const next = args[i + 1];
    if (a.startsWith('--') && !a.includes('=') && next !== undefined && /^-(\d|\.\d|Infinity|NaN)/.test(next)) {
      out.push(`${a}=${next}`);
      i++;
    } else out.push(a);
  }
  return out;
}

export function main(argv: string[]): number {
  const [command, ...rawRest] = argv;
  const rest = joinNegativeValues(rawRest);
  try {
    let result: unknown;
    if (command === 'sun') result = runSun(rest);
    else if (command === 'landscape') result = runLandscape(rest);
    else if (command === 'kpi') result = runKpi(rest);
    else if (command === undefined || command === 'help' || command === '--help') {
      process.stdout.write(USAGE + '\n');
      return command === undefined ? 2 : 0;
    } else throw new InputError(`command: unknown command ${JSON.stringify(command)}; expected "sun", "landscape" or "kpi"\n${USAGE}`);
    process.stdout.write(toJson(result) + '\n');
    return 0;
  } catch (e) {
    const err = e as Error & { code?: string };
    const bad = e instanceof InputError || err.code?.startsWith('ERR_PARSE_ARGS');
    process.stderr.write(`brightward: ${err.message}\n`);
    return bad ? 2 : 1;
  }
}

process.exitCode = main(process.argv.slice(2));
