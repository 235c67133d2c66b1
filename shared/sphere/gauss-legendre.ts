/**
 * Gauss–Legendre quadrature nodes and weights on [a, b] (Newton iteration on the Legendre polynomial,
 * as in W. H. Press et al., "Numerical Recipes", 3rd ed., Cambridge 2007, §4.6). Exact for polynomials of degree ≤ 2n − 1.
 */
const cache = new Map<number, { x: Float64Array; w: Float64Array }>();

/** Nodes and weights on [−1, 1], n ≥ 1. */
export function gaussLegendre(n: number): { x: Float64Array; w: Float64Array } {
  const hit = cache.get(n);
  if (hit) return hit;
  const x = new Float64Array(n);
  const w = new Float64Array(n);
  const m = Math.floor((n + 1) / 2);
  for (let i = 0; i < m; i++) {
    let z = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5));
    let pp = 0;
    for (let iter = 0; iter < 100; iter++) {
      let p1 = 1;
      let p2 = 0;
      for (let j = 1; j <= n; j++) {
        const p3 = p2;
        p2 = p1;
        p1 = ((2 * j - 1) * z * p2 - (j - 1) * p3) / j;
      }
      pp = (n * (z * p1 - p2)) / (z * z - 1);
      const z1 = z;
      z = z1 - p1 / pp;
      if (Math.abs(z - z1) < 1e-15) break;
    }
    x[i] = -z;
    x[n - 1 - i] = z;
    w[i] = 2 / ((1 - z * z) * pp * pp);
    w[n - 1 - i] = w[i]!;
  }
  const out = { x, w };
  cache.set(n, out);
  return out;
}

/** Nodes and weights mapped to [a, b]. */
export function gaussLegendreOn(n: number, a: number, b: number): { x: Float64Array; w: Float64Array } {
  const g = gaussLegendre(n);
  const x = new Float64Array(n);
  const w = new Float64Array(n);
  const h = (b - a) / 2;
  const c = (a + b) / 2;
  for (let i = 0; i < n; i++) {
    x[i] = c + h * g.x[i]!;
    w[i] = h * g.w[i]!;
  }
  return { x, w };
}
