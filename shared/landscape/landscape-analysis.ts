/**
 * Analysis of a landscape on its grid graph: local maxima with topographic prominence, basins of attraction under
 * gradient ascent on the blurred landscape, and the smallest detector tilt that leaves a single peak.
 *
 * Graph: one node per grid cell, 8-neighbourhood, periodic in azimuth on a full-circle grid; the tilt-0 row is one
 * node (every azimuth at tilt 0 is the same normal). A local maximum is a node higher than all its neighbours (ties
 * broken by node order). Prominence: height above the highest saddle on the way to higher ground (union–find over
 * nodes in descending order); the global maximum's prominence is its height above the lowest node. Maxima whose
 * prominence is below a threshold (default max(1 W/m², 0.5 % of the global maximum)) are numerical ripples and are
 * merged into the peak that absorbs them.
 */
import type { Landscape } from './landscape-grid';

export interface GridGraph {
  nodeOfCell: Int32Array;
  nodeCount: number;
  /** Whether node 0 is the merged tilt-0 row. */
  zenithRow: boolean;
  nAzimuth: number;
  /** Neighbours of node k: adjacency[offsets[k] … offsets[k+1]). */
  offsets: Int32Array;
  adjacency: Int32Array;
  /** Representative cell (tilt index, azimuth index) of each node. */
  cellOfNode: Int32Array;
  /** Solid-angle weight of each node (sr). */
  weights: Float64Array;
}

export function gridGraph(l: Landscape): GridGraph {
  const nT = l.tiltsDeg.length;
  const nA = l.azimuthsDeg.length;
  const zenithRow = Math.abs(l.tiltsDeg[0]!) < 1e-9;
  const nodeOfCell = new Int32Array(nT * nA);
  let count = 0;
  for (let i = 0; i < nT; i++) {
    for (let j = 0; j < nA; j++) {
      if (i === 0 && zenithRow) nodeOfCell[j] = 0;
      else nodeOfCell[i * nA + j] = zenithRow ? 1 + (i - 1) * nA + j : i * nA + j;
    }
  }
  count = zenithRow ? 1 + (nT - 1) * nA : nT * nA;
  const cellOfNode = new Int32Array(count);
  const weights = new Float64Array(count);
  const RAD = Math.PI / 180;
  const h = l.stepDeg * RAD;
  const dA = l.periodicAzimuth ? (2 * Math.PI) / nA : l.stepDeg * RAD;
  const t0 = l.tiltsDeg[0]! * RAD;
  const t1 = l.tiltsDeg[nT - 1]! * RAD;
  for (let i = 0; i < nT; i++) {
    const b = l.tiltsDeg[i]! * RAD;
    const lo = Math.max(t0, b - h / 2);
    const hi = Math.min(t1, b + h / 2);
    const band = (Math.cos(lo) - Math.cos(hi)) * dA;
    for (let j = 0; j < nA; j++) {
      const node = nodeOfCell[i * nA + j]!;
      if (i === 0 && zenithRow) {
        weights[0] = weights[0]! + band;
      } else {
        weights[node] = band;
        cellOfNode[node] = i * nA + j;
      }
    }
  }
  // compressed neighbour lists (CSR), deduplicated with a stamp array
  const lists: number[][] = Array.from({ length: count }, () => []);
  const stamp = new Int32Array(count).fill(-1);
  const addEdges = (a: number, i: number, j: number) => {
    for (let di = -1; di <= 1; di++) {
      const ii = i + di;
      if (ii < 0 || ii >= nT) continue;
      for (let dj = -1; dj <= 1; dj++) {
        if (di === 0 && dj === 0) continue;
        let jj = j + dj;
        if (l.periodicAzimuth) jj = (jj + nA) % nA;
        else if (jj < 0 || jj >= nA) continue;
        const b = nodeOfCell[ii * nA + jj]!;
        if (b !== a && stamp[b] !== a) {
          stamp[b] = a;
          lists[a]!.push(b);
        }
      }
    }
  };
  if (zenithRow) for (let j = 0; j < nA; j++) addEdges(0, 0, j);
  for (let i = zenithRow ? 1 : 0; i < nT; i++) for (let j = 0; j < nA; j++) addEdges(nodeOfCell[i * nA + j]!, i, j);
  const offsets = new Int32Array(count + 1);
  for (let k = 0; k < count; k++) offsets[k + 1] = offsets[k]! + lists[k]!.length;
  const adjacency = new Int32Array(offsets[count]!);
  for (let k = 0; k < count; k++) adjacency.set(lists[k]!, offsets[k]!);
  return { nodeOfCell, nodeCount: count, zenithRow, nAzimuth: nA, offsets, adjacency, cellOfNode, weights };
}

/** Node values of a landscape on its graph (the tilt-0 row averaged into one node). */
export function nodeValues(graph: GridGraph, l: Landscape): Float64Array {
  const values = new Float64Array(graph.nodeCount);
  for (let c = 0; c < l.values.length; c++) {
    const node = graph.nodeOfCell[c]!;
    if (graph.zenithRow && node === 0) values[0] = values[0]! + l.values[c]! / graph.nAzimuth;
    else values[node] = l.values[c]!;
  }
  return values;
}

/** Total order: higher value first, then lower node index. */
function higher(values: Float64Array, a: number, b: number): boolean {
  const va = values[a]!;
  const vb = values[b]!;
  return va > vb || (va === vb && a < b);
}

export interface Peak {
  node: number;
  tiltDeg: number;
  azimuthDeg: number;
  wm2: number;
  prominenceWm2: number;
}

export interface PeakAnalysis {
  graph: GridGraph;
  values: Float64Array;
  /** Prominent peaks, highest first. */
  peaks: Peak[];
  /** For every local maximum node: the prominent peak it belongs to. */
  peakOfMaximum: Map<number, number>;
  minProminenceWm2: number;
}

export function defaultMinProminenceWm2(globalMaxWm2: number): number {
  return Math.max(1, 0.005 * globalMaxWm2);
}

/** Local maxima with prominence (union–find in descending order). */
export function analysePeaks(l: Landscape, minProminenceWm2?: number, graph = gridGraph(l)): PeakAnalysis {
  const { offsets, adjacency, nodeCount } = graph;
  const values = nodeValues(graph, l);
  const order = new Int32Array(nodeCount);
  for (let k = 0; k < nodeCount; k++) order[k] = k;
  order.sort((a, b) => values[b]! - values[a]! || a - b);
  const parent = new Int32Array(nodeCount).fill(-1);
  const peakOf = new Int32Array(nodeCount).fill(-1); // peak node of a root's component
  const find = (x: number): number => {
    while (parent[x] !== x) {
      parent[x] = parent[parent[x]!]!;
      x = parent[x]!;
    }
    return x;
  };
  const prominence = new Map<number, number>();
  const absorbedBy = new Map<number, number>();
  const maxima: number[] = [];
  let minValue = Infinity;
  const roots: number[] = [];
  for (let oi = 0; oi < nodeCount; oi++) {
    const v = order[oi]!;
    parent[v] = v;
    if (values[v]! < minValue) minValue = values[v]!;
    roots.length = 0;
    for (let e = offsets[v]!; e < offsets[v + 1]!; e++) {
      const nb = adjacency[e]!;
      if (parent[nb] === -1) continue;
      const r = find(nb);
      if (!roots.includes(r)) roots.push(r);
    }
    if (roots.length === 0) {
      peakOf[v] = v;
      maxima.push(v);
      continue;
    }
    let best = roots[0]!;
    for (const r of roots) if (higher(values, peakOf[r]!, peakOf[best]!)) best = r;
    for (const r of roots) {
      if (r === best) continue;
      const p = peakOf[r]!;
      prominence.set(p, values[p]! - values[v]!);
      absorbedBy.set(p, peakOf[best]!);
      parent[r] = best;
    }
    parent[v] = best;
  }
  const globalPeak = order[0]!;
  prominence.set(globalPeak, values[globalPeak]! - minValue);
  const threshold = minProminenceWm2 ?? defaultMinProminenceWm2(values[globalPeak]!);
  const isPeak = (p: number) => p === globalPeak || prominence.get(p)! >= threshold;
  const peakOfMaximum = new Map<number, number>();
  for (const m of maxima) {
    let p = m;
    while (!isPeak(p)) p = absorbedBy.get(p)!;
    peakOfMaximum.set(m, p);
  }
  const nA = l.azimuthsDeg.length;
  const peaks: Peak[] = maxima.filter(isPeak).map((p) => {
    const cell = graph.cellOfNode[p]!;
    const zenith = p === 0 && graph.zenithRow;
    return {
      node: p,
      tiltDeg: zenith ? l.tiltsDeg[0]! : l.tiltsDeg[Math.floor(cell / nA)]!,
      azimuthDeg: zenith ? 0 : l.azimuthsDeg[cell % nA]!,
      wm2: values[p]!,
      prominenceWm2: prominence.get(p)!,
    };
  });
  peaks.sort((a, b) => b.wm2 - a.wm2);
  return { graph, values, peaks, peakOfMaximum, minProminenceWm2: threshold };
}

/** Steepest-ascent successor of every node (itself at a local maximum). */
function ascentTargets(graph: GridGraph, values: Float64Array): Int32Array {
  const next = new Int32Array(graph.nodeCount);
  for (let v = 0; v < graph.nodeCount; v++) {
    let best = v;
    for (let e = graph.offsets[v]!; e < graph.offsets[v + 1]!; e++) {
      const nb = graph.adjacency[e]!;
      if (higher(values, nb, best)) best = nb;
    }
    next[v] = best;
  }
  // path compression to the terminal maximum
  const end = new Int32Array(graph.nodeCount).fill(-1);
  for (let v = 0; v < graph.nodeCount; v++) {
    const path: number[] = [];
    let x = v;
    while (end[x] === -1 && next[x] !== x) {
      path.push(x);
      x = next[x]!;
    }
    const t = end[x] !== -1 ? end[x]! : x;
    end[x] = t;
    for (const p of path) end[p] = t;
  }
  return end;
}

/**
 * Basin share of each prominent peak of `raw`: the solid-angle share of starting orientations from which gradient
 * ascent on `blurred` (the landscape a unit with detector tilt δ climbs) ends in that peak's basin. Ascent that stops
 * on a blurred ripple (prominence below the raw threshold) continues to the blurred peak that absorbs it; a blurred
 * peak is attributed to the raw peak reached from it by ascent on `raw`. Shares sum to 1.
 */
export function basinShares(raw: PeakAnalysis, blurred: Landscape): Map<number, number> {
  const g = raw.graph;
  const blurredPeaks = analysePeaks(blurred, raw.minProminenceWm2, g);
  const endBlurred = ascentTargets(g, blurredPeaks.values);
  const endRaw = ascentTargets(g, raw.values);
  const shares = new Map<number, number>();
  let total = 0;
  for (let v = 0; v < g.nodeCount; v++) {
    const blurredPeak = blurredPeaks.peakOfMaximum.get(endBlurred[v]!)!;
    const peak = raw.peakOfMaximum.get(endRaw[blurredPeak]!)!;
    shares.set(peak, (shares.get(peak) ?? 0) + g.weights[v]!);
    total += g.weights[v]!;
  }
  for (const [k, w] of shares) shares.set(k, w / total);
  return shares;
}
