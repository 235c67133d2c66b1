/**
 * Fast irradiance: E(n) = Σ_sharp I·max(0, n·p) + Σ_lm Â_l L_lm Y_lm(n).
 *
 * Sharp sources (sun disc, its facade images, lamps) are summed in closed form. The extended radiance (sky dome,
 * ground, obstructions, mirrored sky) is projected once per sky onto real spherical harmonics up to order
 * `SH_ORDER` by quadrature on a 2×64-row Gauss–Legendre × 360-column grid with fractional coverage of cells cut by
 * the horizon profile or a facade edge; irradiance is then a per-degree multiplication by the clamped-cosine
 * coefficients Â_l (Ramamoorthi & Hanrahan 2001; see sphere/clamped-cosine-ramamoorthi-hanrahan-2001).
 *
 * Order and error: SH_ORDER = 24 (625 coefficients). Truncating the kernel alone would leave a point source with a
 * worst-case error of 1.25 % of its normal irradiance at order 24 (9.4 % at order 2, 3.4 % at order 8), because
 * Â_l falls only as l^(−5/2); that is why sharp sources never go through the harmonics. For the extended radiance,
 * whose own coefficients also fall off, the error measured against the brute-force reference (irradiance-brute) on
 * the benchmark skies is ≈ 0.002 % mean and < 1 % max where E > 10 W/m²; the tests hold it to 1 % / 3 % on seeded
 * random skies (see shared/README.md).
 */
import { capAverageMultipliers, capAveragedClampedCosineTable, lookupCapTable } from '../sphere/cap-average';
import { clampedCosineCoefficients } from '../sphere/clamped-cosine-ramamoorthi-hanrahan-2001';
import { directionFromAzimuthElevation, normalFromTiltAzimuth, type Vec3, wrap360 } from '../sphere/directions';
import { evaluateSh, evaluateShOnTiltAzimuthGrid, shIndex } from '../sphere/spherical-harmonics';
import { projectGridOnSh, sphereGrid, type SphereGrid } from '../sphere/sphere-grid';
import { horizonMeanElevationDeg } from '../sky-radiance/horizon-profile';
import { reflectorAzimuthOverlapDeg } from '../sky-radiance/facade-reflectors';
import { pointSourceIrradiance, reflectorRadiance, type Sky } from '../sky-radiance/sky';
import { dot } from '../sphere/directions';

export const SH_ORDER = 24;
const GRID_HALF_ROWS = 64;
const GRID_COLUMNS = 360;
const SUB_COLUMNS = 4;

export interface FastModel {
  order: number;
  /** Irradiance coefficients E_lm = Â_l L_lm of the extended radiance. */
  irradianceCoefficients: Float64Array;
  scratch: Float64Array;
}

/** Extended radiance averaged over every cell of the projection grid (fractional coverage at edges). */
export function cellRadiance(sky: Sky, grid: SphereGrid): Float64Array {
  const { nRows, nAzimuth, nHalf } = grid;
  const out = new Float64Array(nRows * nAzimuth);
  const lz = sky.zenithRadianceWm2Sr;
  const lg = sky.groundRadianceWm2Sr;
  const RAD = Math.PI / 180;
  const w = grid.columnWidthDeg;
  // horizon: mean elevation of SUB_COLUMNS sub-bands per column, as sin(elevation)
  const hz = new Float64Array(nAzimuth * SUB_COLUMNS);
  let maxHz = 0;
  for (let j = 0; j < nAzimuth; j++) {
    for (let k = 0; k < SUB_COLUMNS; k++) {
      const a0 = j * w + (k * w) / SUB_COLUMNS;
      const e = Math.max(0, horizonMeanElevationDeg(sky.horizon, a0, a0 + w / SUB_COLUMNS));
      hz[j * SUB_COLUMNS + k] = Math.sin(e * RAD);
      if (e > maxHz) maxHz = e;
    }
  }
  for (let i = 0; i < nRows; i++) {
    const zt = Math.sin(grid.rowTopDeg[i]! * RAD);
    const zb = Math.sin(grid.rowBottomDeg[i]! * RAD);
    const upper = i < nHalf;
    const row = i * nAzimuth;
    for (let j = 0; j < nAzimuth; j++) {
      let v: number;
      if (!upper) v = lg;
      else {
        const d = directionFromAzimuthElevation(grid.columnAzimuthDeg[j]!, grid.rowElevationDeg[i]!);
        const dome = lz === 0 ? 0 : lz * sky.domeShape(d);
        if (grid.rowBottomDeg[i]! >= maxHz) v = dome;
        else {
          let vis = 0;
          for (let k = 0; k < SUB_COLUMNS; k++) {
            const h = hz[j * SUB_COLUMNS + k]!;
            vis += h <= zb ? 1 : h >= zt ? 0 : (zt - h) / (zt - zb);
          }
          vis /= SUB_COLUMNS;
          v = vis * dome + (1 - vis) * lg;
        }
      }
      out[row + j] = v;
    }
  }
  // facades in front of everything: coverage = azimuth overlap × sin-elevation overlap
  for (const r of sky.reflectors) {
    const zlo = Math.sin(r.elevationFromDeg * RAD);
    const zhi = Math.sin(r.elevationToDeg * RAD);
    for (let j = 0; j < nAzimuth; j++) {
      const fa = reflectorAzimuthOverlapDeg(r, j * w, w) / w;
      if (fa <= 0) continue;
      for (let i = 0; i < nRows; i++) {
        const zt = Math.sin(grid.rowTopDeg[i]! * RAD);
        const zb = Math.sin(grid.rowBottomDeg[i]! * RAD);
        const fe = Math.max(0, Math.min(zt, zhi) - Math.max(zb, zlo)) / (zt - zb);
        if (fe <= 0) continue;
        const f = fa * fe;
        // radiance at the part of the cell inside the facade
        const az = clampAzimuthInto(grid.columnAzimuthDeg[j]!, r.azimuthFromDeg, r.azimuthWidthDeg);
        const el = Math.min(r.elevationToDeg, Math.max(r.elevationFromDeg, grid.rowElevationDeg[i]!));
        const lr = reflectorRadiance(sky, r, directionFromAzimuthElevation(az, el));
        out[i * nAzimuth + j] = (1 - f) * out[i * nAzimuth + j]! + f * lr;
      }
    }
  }
  return out;
}

function clampAzimuthInto(a: number, from: number, width: number): number {
  const da = wrap360(a - from);
  if (da <= width) return a;
  // outside: snap to the nearer end
  return da - width < 360 - da ? (from + width) % 360 : from;
}

/** Build (or fetch from the sky's cache) the fast model. */
export function fastModel(sky: Sky, order = SH_ORDER): FastModel {
  const key = `fast:${order}`;
  const hit = sky.cache.get(key) as FastModel | undefined;
  if (hit) return hit;
  const grid = sphereGrid(GRID_HALF_ROWS, GRID_COLUMNS);
  const radiance = cellRadiance(sky, grid);
  const c = projectGridOnSh(grid, radiance, order);
  const a = clampedCosineCoefficients(order);
  for (let l = 0; l <= order; l++) for (let m = -l; m <= l; m++) c[shIndex(l, m)] = c[shIndex(l, m)]! * a[l]!;
  const model: FastModel = { order, irradianceCoefficients: c, scratch: new Float64Array(((order + 1) * (order + 2)) / 2) };
  sky.cache.set(key, model);
  return model;
}

/** Irradiance (W/m²) on one plane by the fast method; a few microseconds per call once the model is built. */
export function irradianceFastAtNormal(sky: Sky, n: Vec3, order = SH_ORDER): number {
  const m = fastModel(sky, order);
  return Math.max(0, evaluateSh(m.order, m.irradianceCoefficients, n, m.scratch) + pointSourceIrradiance(sky, n));
}

/** Irradiance coefficients of the sky, optionally cap-averaged over angular radius `capRadiusRad`. */
function coefficientsFor(sky: Sky, order: number, capRadiusRad: number): Float64Array {
  const m = fastModel(sky, order);
  if (capRadiusRad <= 0) return m.irradianceCoefficients;
  const k = capAverageMultipliers(order, capRadiusRad);
  const c = m.irradianceCoefficients.slice();
  for (let l = 0; l <= order; l++) for (let mm = -l; mm <= l; mm++) c[shIndex(l, mm)] = c[shIndex(l, mm)]! * k[l]!;
  return c;
}

/**
 * Fast landscape on a tilt × azimuth grid. With `capRadiusDeg` > 0 the result is the landscape averaged over a
 * spherical cap of that radius around each normal (exact in the harmonic domain; tabulated for the sharp sources).
 */
export function landscapeFastValues(
  sky: Sky,
  tiltsDeg: Float64Array,
  azimuthsDeg: Float64Array,
  order = SH_ORDER,
  capRadiusDeg = 0,
): Float64Array {
  const capRad = (capRadiusDeg * Math.PI) / 180;
  const out = evaluateShOnTiltAzimuthGrid(order, coefficientsFor(sky, order, capRad), tiltsDeg, azimuthsDeg);
  const nA = azimuthsDeg.length;
  if (sky.pointSources.length > 0) {
    const table = capRad > 0 ? capAveragedClampedCosineTable(capRad) : null;
    for (let i = 0; i < tiltsDeg.length; i++) {
      for (let j = 0; j < nA; j++) {
        const n = normalFromTiltAzimuth(tiltsDeg[i]!, azimuthsDeg[j]!);
        if (!table) out[i * nA + j] = out[i * nA + j]! + pointSourceIrradiance(sky, n);
        else
          for (const p of sky.pointSources)
            out[i * nA + j] = out[i * nA + j]! + p.irradianceWm2 * lookupCapTable(table, dot(n, p.direction));
      }
    }
  }
  for (let k = 0; k < out.length; k++) if (!(out[k]! > 0)) out[k] = 0;
  return out;
}
