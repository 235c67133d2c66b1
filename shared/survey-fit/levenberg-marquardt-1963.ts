/**
 * Bounded nonlinear least squares by the Levenberg–Marquardt method, with the asymptotic covariance of the estimate.
 *
 * References:
 * - K. Levenberg (1944), "A method for the solution of certain non-linear problems in least squares", Quarterly of
 *   Applied Mathematics 2(2), 164–168 (the damped Gauss–Newton step).
 * - D. W. Marquardt (1963), "An algorithm for least-squares estimation of nonlinear parameters", Journal of the Society
 *   for Industrial and Applied Mathematics 11(2), 431–441 (damping scaled by diag(JᵀJ), λ up ×10 on a failed step and
 *   down ÷10 on a successful one).
 * - C. Kanzow, N. Yamashita, M. Fukushima (2004), "Levenberg–Marquardt methods with strong local convergence properties
 *   for solving nonlinear equations with convex constraints", Journal of Computational and Applied Mathematics 172(2),
 *   375–397 (bounds by projecting the step onto the box; volume and pages from memory).
 * - G. A. F. Seber, C. J. Wild (1989), "Nonlinear Regression", Wiley, ch. 2 (the estimate's covariance
 *   s²(JᵀJ)⁻¹ with s² = S(θ̂)/(n − p), J the Jacobian of the residuals at the solution; chapter from memory).
 *
 * Method: minimise S(θ) = Σ rᵢ(θ)² over a box lo ≤ θ ≤ hi. Each iteration takes a forward-difference Jacobian (stepping
 * into the box at an upper bound), solves (JᵀJ + λ·diag(JᵀJ)) δ = −Jᵀr by Cholesky, projects θ + δ onto the box, and keeps
 * the step only when S falls. It stops when S falls by less than `relativeTolerance` of itself, when no step within
 * `maxDamping` lowers S, or after `maxIterations`. The covariance is taken over the parameters that ended inside their
 * bounds (those at a bound are reported without one): the linearised estimate, valid when the residuals are roughly
 * independent with equal variance after weighting and the model is nearly linear over the uncertainty.
 *
 * The residual function is async so that a caller can give other work a turn between its (expensive) evaluations; the
 * method itself does no I/O. Units are the caller's: parameters in their own units, residuals already weighted.
 */

export interface BoundedProblem {
  /** Start values, inside the bounds. */
  start: readonly number[];
  lower: readonly number[];
  upper: readonly number[];
  /** Forward-difference steps per parameter (in the parameter's unit, > 0). */
  stepSizes: readonly number[];
  /** Weighted residuals at θ (the same length every call). */
  residuals(theta: readonly number[]): Promise<Float64Array>;
}

export interface LmOptions {
  maxIterations?: number;
  /** Stop when S falls by less than this fraction of itself in an accepted step; default 1e-4. */
  relativeTolerance?: number;
  /** Start damping λ; default 1e-3 (Marquardt 1963). */
  damping?: number;
  /** Give up on a step when λ exceeds this; default 1e6. */
  maxDamping?: number;
}

export interface LmResult {
  theta: number[];
  /** Sum of squared residuals at the start and at the solution. */
  startCost: number;
  cost: number;
  iterations: number;
  /** Residual evaluations spent (Jacobian columns included). */
  evaluations: number;
  /** Whether it stopped on the tolerance or on no downhill step (not on the iteration limit). */
  converged: boolean;
  /** Per parameter: whether it ended at a bound. */
  atBound: boolean[];
  /** Standard error per parameter (null at a bound, or when the problem gives none). */
  standardErrors: (number | null)[];
  /** s² = S/(n − p_free): the residual variance after weighting. */
  residualVariance: number | null;
  /** Jacobian of the residuals at the solution, row-major n × p. */
  jacobian: Float64Array;
}

const sumSq = (r: Float64Array) => {
  let s = 0;
  for (const x of r) s += x * x;
  return s;
};

function checkProblem(p: BoundedProblem): void {
  const n = p.start.length;
  if (n === 0) throw new RangeError('start: needs at least one parameter');
  for (const [name, v] of [
    ['lower', p.lower],
    ['upper', p.upper],
    ['stepSizes', p.stepSizes],
  ] as const)
    if (v.length !== n) throw new RangeError(`${name}: must have ${n} values like start; got ${v.length}`);
  for (let k = 0; k < n; k++) {
    const [s, lo, hi, h] = [p.start[k]!, p.lower[k]!, p.upper[k]!, p.stepSizes[k]!];
    if (![s, lo, hi, h].every(Number.isFinite)) throw new RangeError(`parameter ${k}: start, bounds and step must be finite`);
    if (lo > hi) throw new RangeError(`parameter ${k}: lower bound ${lo} is above upper bound ${hi}`);
    if (s < lo || s > hi) throw new RangeError(`parameter ${k}: start ${s} is outside [${lo}, ${hi}]`);
    if (!(h > 0)) throw new RangeError(`parameter ${k}: step size must be > 0; got ${h}`);
  }
}

/** Cholesky solve of a symmetric positive definite n × n system (row-major); null when not positive definite. */
export function choleskySolve(a: Float64Array, b: Float64Array, n: number): Float64Array | null {
  const l = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = a[i * n + j]!;
      for (let k = 0; k < j; k++) s -= l[i * n + k]! * l[j * n + k]!;
      if (i === j) {
        if (!(s > 0)) return null;
        l[i * n + i] = Math.sqrt(s);
      } else l[i * n + j] = s / l[j * n + j]!;
    }
  }
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let s = b[i]!;
    for (let k = 0; k < i; k++) s -= l[i * n + k]! * y[k]!;
    y[i] = s / l[i * n + i]!;
  }
  const x = new Float64Array(n);
  for (let i = n - 1; i >= 0; i--) {
    let s = y[i]!;
    for (let k = i + 1; k < n; k++) s -= l[k * n + i]! * x[k]!;
    x[i] = s / l[i * n + i]!;
  }
  return x;
}

/** Inverse of a symmetric positive definite matrix by Cholesky, one column at a time; null when singular. */
function spdInverse(a: Float64Array, n: number): Float64Array | null {
  const inv = new Float64Array(n * n);
  for (let c = 0; c < n; c++) {
    const e = new Float64Array(n);
    e[c] = 1;
    const x = choleskySolve(a, e, n);
    if (!x) return null;
    for (let r = 0; r < n; r++) inv[r * n + c] = x[r]!;
  }
  return inv;
}

/** Forward-difference Jacobian of the residuals at θ (row-major m × p), stepping into the box at an upper bound. */
async function jacobianAt(p: BoundedProblem, theta: number[], r0: Float64Array): Promise<Float64Array> {
  const m = r0.length;
  const n = theta.length;
  const j = new Float64Array(m * n);
  for (let k = 0; k < n; k++) {
    let h = p.stepSizes[k]!;
    if (theta[k]! + h > p.upper[k]!) h = -h;
    const t = theta.slice();
    t[k] = theta[k]! + h;
    const r = await p.residuals(t);
    for (let i = 0; i < m; i++) j[i * n + k] = (r[i]! - r0[i]!) / h;
  }
  return j;
}

/** JᵀJ (p × p) and Jᵀr (p) of a row-major m × p Jacobian. */
function normalEquations(j: Float64Array, r: Float64Array, m: number, n: number) {
  const a = new Float64Array(n * n);
  const g = new Float64Array(n);
  for (let i = 0; i < m; i++) {
    const row = i * n;
    for (let k = 0; k < n; k++) {
      const jk = j[row + k]!;
      if (jk === 0) continue;
      g[k] = g[k]! + jk * r[i]!;
      for (let l = 0; l <= k; l++) a[k * n + l] = a[k * n + l]! + jk * j[row + l]!;
    }
  }
  for (let k = 0; k < n; k++) for (let l = 0; l < k; l++) a[l * n + k] = a[k * n + l]!;
  return { a, g };
}

export async function levenbergMarquardt(p: BoundedProblem, o: LmOptions = {}): Promise<LmResult> {
  checkProblem(p);
  const maxIterations = o.maxIterations ?? 20;
  const tol = o.relativeTolerance ?? 1e-4;
  const maxDamping = o.maxDamping ?? 1e6;
  let lambda = o.damping ?? 1e-3;
  const n = p.start.length;
  const clamp = (t: number[]) => t.map((x, k) => Math.min(p.upper[k]!, Math.max(p.lower[k]!, x)));
  let theta = clamp([...p.start]);
  let r = await p.residuals(theta);
  const m = r.length;
  let evaluations = 1;
  const startCost = sumSq(r);
  let cost = startCost;
  let iterations = 0;
  let converged = false;
  let j: Float64Array | null = null;
  while (iterations < maxIterations && !converged) {
    iterations++;
    j = await jacobianAt(p, theta, r);
    evaluations += n;
    const { a, g } = normalEquations(j, r, m, n);
    let accepted = false;
    while (!accepted) {
      const damped = a.slice();
      for (let k = 0; k < n; k++) damped[k * n + k] = a[k * n + k]! * (1 + lambda) + 1e-12;
      const delta = choleskySolve(
        damped,
        g.map((x) => -x),
        n,
      );
      if (!delta) {
        lambda *= 10;
        if (lambda > maxDamping) break;
        continue;
      }
      const trial = clamp(theta.map((x, k) => x + delta[k]!));
      if (trial.every((x, k) => x === theta[k])) break;
      const rt = await p.residuals(trial);
      evaluations++;
      const ct = sumSq(rt);
      if (ct < cost) {
        const drop = (cost - ct) / Math.max(cost, 1e-300);
        theta = trial;
        r = rt;
        cost = ct;
        j = null;
        lambda = Math.max(lambda / 10, 1e-9);
        accepted = true;
        if (drop < tol) converged = true;
      } else {
        lambda *= 10;
        if (lambda > maxDamping) break;
      }
    }
    // No step within the damping limit lowers S: θ is a (bounded) local minimum at this resolution.
    if (!accepted) converged = true;
  }
  if (!j) {
    j = await jacobianAt(p, theta, r);
    evaluations += n;
  }
  const width = (k: number) => Math.max(p.upper[k]! - p.lower[k]!, 1e-12);
  const atBound = theta.map(
    (x, k) => p.upper[k]! > p.lower[k]! && (x - p.lower[k]! <= 1e-9 * width(k) || p.upper[k]! - x <= 1e-9 * width(k)),
  );
  const free = theta.map((_, k) => k).filter((k) => !atBound[k] && p.upper[k]! > p.lower[k]!);
  const standardErrors: (number | null)[] = theta.map(() => null);
  let residualVariance: number | null = null;
  if (free.length && m > free.length) {
    residualVariance = cost / (m - free.length);
    const f = free.length;
    const jf = new Float64Array(m * f);
    for (let i = 0; i < m; i++) free.forEach((k, c) => (jf[i * f + c] = j![i * n + k]!));
    const { a } = normalEquations(jf, new Float64Array(m), m, f);
    const inv = spdInverse(a, f);
    if (inv) free.forEach((k, c) => (standardErrors[k] = Math.sqrt(residualVariance! * Math.max(0, inv[c * f + c]!))));
  }
  return { theta, startCost, cost, iterations, evaluations, converged, atBound, standardErrors, residualVariance, jacobian: j };
}
