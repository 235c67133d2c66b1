/**
 * Product quadrature grid over the whole sphere used to project radiance onto spherical harmonics:
 * Gauss–Legendre nodes in x = cos θ separately on the upper [0, 1] and lower [−1, 0] hemispheres (so the horizon
 * z = 0 is a cell boundary and each half is integrated to high order), times `nAzimuth` equal cells in azimuth.
 * Each node owns a cell: its elevation band is bounded where the cumulative Gauss weights reach it (the band's
 * solid angle equals the node weight exactly), its azimuth band is one equal step. Cells support fractional coverage
 * (a horizon line or a facade edge crossing a cell), which is what keeps sharp edges from aliasing.
 */
import { gaussLegendreOn } from './gauss-legendre';
import { legendreIndex, normalizedLegendre } from './spherical-harmonics';

export interface SphereGrid {
  nHalf: number;
  nRows: number;
  nAzimuth: number;
  /** Row node cos θ (= sin elevation), rows ordered from zenith (row 0) to nadir. */
  rowZ: Float64Array;
  /** Row node elevation (deg). */
  rowElevationDeg: Float64Array;
  /** Row band: upper and lower elevation bounds (deg). */
  rowTopDeg: Float64Array;
  rowBottomDeg: Float64Array;
  /** Solid angle of one cell in row i (sr). */
  rowCellSolidAngle: Float64Array;
  /** Column centre azimuth (deg, clockwise from north) and band width (deg). */
  columnAzimuthDeg: Float64Array;
  columnWidthDeg: number;
}

const gridCache = new Map<string, SphereGrid>();

export function sphereGrid(nHalf: number, nAzimuth: number): SphereGrid {
  const key = `${nHalf}:${nAzimuth}`;
  const hit = gridCache.get(key);
  if (hit) return hit;
  const nRows = 2 * nHalf;
  const g = gaussLegendreOn(nHalf, 0, 1);
  const rowZ = new Float64Array(nRows);
  const rowW = new Float64Array(nRows);
  // upper hemisphere: nodes in descending z
  for (let i = 0; i < nHalf; i++) {
    rowZ[i] = g.x[nHalf - 1 - i]!;
    rowW[i] = g.w[nHalf - 1 - i]!;
    rowZ[nRows - 1 - i] = -rowZ[i]!;
    rowW[nRows - 1 - i] = rowW[i]!;
  }
  const rowTopDeg = new Float64Array(nRows);
  const rowBottomDeg = new Float64Array(nRows);
  let top = 1;
  for (let i = 0; i < nRows; i++) {
    const bottom = i === nHalf - 1 ? 0 : i === nRows - 1 ? -1 : top - rowW[i]!;
    rowTopDeg[i] = (Math.asin(Math.max(-1, Math.min(1, top))) * 180) / Math.PI;
    rowBottomDeg[i] = (Math.asin(Math.max(-1, Math.min(1, bottom))) * 180) / Math.PI;
    top = bottom;
  }
  const dPhi = (2 * Math.PI) / nAzimuth;
  const columnAzimuthDeg = new Float64Array(nAzimuth);
  for (let j = 0; j < nAzimuth; j++) columnAzimuthDeg[j] = ((j + 0.5) * 360) / nAzimuth;
  const grid: SphereGrid = {
    nHalf,
    nRows,
    nAzimuth,
    rowZ,
    rowElevationDeg: rowZ.map((z) => (Math.asin(z) * 180) / Math.PI),
    rowTopDeg,
    rowBottomDeg,
    rowCellSolidAngle: rowW.map((w) => w * dPhi),
    columnAzimuthDeg,
    columnWidthDeg: 360 / nAzimuth,
  };
  gridCache.set(key, grid);
  return grid;
}

/**
 * Project cell values (radiance per cell, row-major [row * nAzimuth + col]) onto real SH up to `order`:
 * c_lm = Σ L · Y_lm · ΔΩ. Separable: a Fourier sum per row, then Legendre weights per row.
 */
export function projectGridOnSh(grid: SphereGrid, values: Float64Array, order: number): Float64Array {
  const { nRows, nAzimuth } = grid;
  const out = new Float64Array((order + 1) * (order + 1));
  const scratch = new Float64Array(((order + 1) * (order + 2)) / 2);
  const cosT = trigTable(grid, order, Math.cos);
  const sinT = trigTable(grid, order, Math.sin);
  const fc = new Float64Array(order + 1);
  const fs = new Float64Array(order + 1);
  for (let i = 0; i < nRows; i++) {
    fc.fill(0);
    fs.fill(0);
    const row = i * nAzimuth;
    let any = false;
    for (let j = 0; j < nAzimuth; j++) {
      const v = values[row + j]!;
      if (v === 0) continue;
      any = true;
      const base = j * (order + 1);
      fc[0] = fc[0]! + v;
      for (let m = 1; m <= order; m++) {
        fc[m] = fc[m]! + v * cosT[base + m]!;
        fs[m] = fs[m]! + v * sinT[base + m]!;
      }
    }
    if (!any) continue;
    const w = grid.rowCellSolidAngle[i]!;
    normalizedLegendre(order, grid.rowZ[i]!, scratch);
    for (let l = 0; l <= order; l++) {
      const ll = l * l + l;
      out[ll] = out[ll]! + w * scratch[legendreIndex(l, 0)]! * fc[0]!;
      for (let m = 1; m <= l; m++) {
        const p = w * Math.SQRT2 * scratch[legendreIndex(l, m)]!;
        out[ll + m] = out[ll + m]! + p * fc[m]!;
        out[ll - m] = out[ll - m]! + p * fs[m]!;
      }
    }
  }
  return out;
}

const trigCache = new Map<string, Float64Array>();
function trigTable(grid: SphereGrid, order: number, f: (x: number) => number): Float64Array {
  const key = `${grid.nAzimuth}:${order}:${f === Math.cos ? 'c' : 's'}`;
  const hit = trigCache.get(key);
  if (hit) return hit;
  const t = new Float64Array(grid.nAzimuth * (order + 1));
  for (let j = 0; j < grid.nAzimuth; j++) {
    const phi = ((90 - grid.columnAzimuthDeg[j]!) * Math.PI) / 180;
    for (let m = 0; m <= order; m++) t[j * (order + 1) + m] = f(m * phi);
  }
  trigCache.set(key, t);
  return t;
}
