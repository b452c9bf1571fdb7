// Weighted non-linear least squares by Levenberg-Marquardt, for the resonance and dial-chart fits.
// Source: D. W. Marquardt, "An algorithm for least-squares estimation of nonlinear parameters",
// J. SIAM 11(2), 431-441 (1963): damping scaled by the diagonal of J'WJ, so parameters of very
// different size (Hz, Q, a fraction) are damped alike; covariance s^2 (J'WJ)^-1 with
// s^2 = weighted SSR / (n - p) as in the NIST/SEMATECH e-Handbook 4.4.3.
//
// Hand-written rather than taken from ml-levenberg-marquardt (which is installed and is the
// comparison in test/bench/fit.bench.ts) because the fits need four things it does not give:
// the covariance matrix at the solution (for u(f0) and u(QL)), Marquardt's scaled damping
// (its damping is added to the diagonal unscaled), complex residuals written as two real rows
// without building an n x p matrix object, and rejection of steps that leave the physical
// region (QL > 0, a depth below 1) instead of clamping them. The loop is about 100 lines.

export interface LsqProblem {
  /** Number of residual rows. */
  rows: number;
  /** Number of parameters. */
  params: number;
  /**
   * Fills residuals r[i] = data - model and, when `jac` is given, the model derivatives
   * jac[i * params + k] = d model_i / d p_k. Returns false when p is outside the physical region.
   */
  evaluate(p: Float64Array, r: Float64Array, jac: Float64Array | null): boolean;
  /** Weight of each row (1 / variance up to a common factor); all 1 when absent. */
  weights?: Float64Array;
}

export interface LsqOptions {
  maxIterations?: number;
  /** Stop when the relative decrease of the weighted SSR falls below this. */
  relativeTolerance?: number;
}

export interface LsqResult {
  params: Float64Array;
  /** Weighted sum of squared residuals at the solution. */
  ssr: number;
  /** Covariance of the parameters, params x params, row-major: s^2 (J'WJ)^-1. */
  covariance: Float64Array;
  /** Residual variance factor s^2 = ssr / (rows - params). */
  residualVariance: number;
  iterations: number;
  converged: boolean;
}

export class LsqError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'LsqError';
  }
}

/** Solves A x = b for a symmetric positive definite A (n x n, row-major) by Cholesky; null if not SPD. */
export function choleskySolve(a: Float64Array, b: Float64Array, n: number): Float64Array | null {
  const l = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = a[i * n + j] as number;
      for (let k = 0; k < j; k++) s -= (l[i * n + k] as number) * (l[j * n + k] as number);
      if (i === j) {
        if (!(s > 0)) return null;
        l[i * n + i] = Math.sqrt(s);
      } else l[i * n + j] = s / (l[j * n + j] as number);
    }
  }
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let s = b[i] as number;
    for (let k = 0; k < i; k++) s -= (l[i * n + k] as number) * (y[k] as number);
    y[i] = s / (l[i * n + i] as number);
  }
  const x = new Float64Array(n);
  for (let i = n - 1; i >= 0; i--) {
    let s = y[i] as number;
    for (let k = i + 1; k < n; k++) s -= (l[k * n + i] as number) * (x[k] as number);
    x[i] = s / (l[i * n + i] as number);
  }
  return x;
}

/** Inverse of a symmetric positive definite matrix, or null. */
export function spdInverse(a: Float64Array, n: number): Float64Array | null {
  const inv = new Float64Array(n * n);
  for (let c = 0; c < n; c++) {
    const e = new Float64Array(n);
    e[c] = 1;
    const x = choleskySolve(a, e, n);
    if (!x) return null;
    for (let r = 0; r < n; r++) inv[r * n + c] = x[r] as number;
  }
  return inv;
}

function normalEquations(
  problem: LsqProblem,
  r: Float64Array,
  jac: Float64Array,
  jtj: Float64Array,
  jtr: Float64Array,
): void {
  const p = problem.params;
  const w = problem.weights;
  jtj.fill(0);
  jtr.fill(0);
  for (let i = 0; i < problem.rows; i++) {
    const wi = w ? (w[i] as number) : 1;
    if (wi === 0) continue;
    const ri = r[i] as number;
    const base = i * p;
    for (let a = 0; a < p; a++) {
      const ja = (jac[base + a] as number) * wi;
      jtr[a] = (jtr[a] as number) + ja * ri;
      for (let b = 0; b <= a; b++)
        jtj[a * p + b] = (jtj[a * p + b] as number) + ja * (jac[base + b] as number);
    }
  }
  for (let a = 0; a < p; a++) for (let b = a + 1; b < p; b++) jtj[a * p + b] = jtj[b * p + a] as number;
}

function weightedSsr(problem: LsqProblem, r: Float64Array): number {
  const w = problem.weights;
  let s = 0;
  for (let i = 0; i < problem.rows; i++) {
    const ri = r[i] as number;
    s += (w ? (w[i] as number) : 1) * ri * ri;
  }
  return s;
}

/** Minimizes sum w_i r_i^2 from `start`. Throws LsqError when the start is outside the model's region
 * or the normal matrix is singular at the solution. */
export function levenbergMarquardt(
  problem: LsqProblem,
  start: ArrayLike<number>,
  options: LsqOptions = {},
): LsqResult {
  const n = problem.rows;
  const p = problem.params;
  if (n <= p) throw new LsqError(`${n} data for ${p} parameters: a fit needs more data than parameters`);
  const maxIterations = options.maxIterations ?? 200;
  const tolerance = options.relativeTolerance ?? 1e-12;
  let params = Float64Array.from(start);
  const r = new Float64Array(n);
  const jac = new Float64Array(n * p);
  const rTry = new Float64Array(n);
  const jtj = new Float64Array(p * p);
  const jtr = new Float64Array(p);
  const damped = new Float64Array(p * p);
  if (!problem.evaluate(params, r, jac)) throw new LsqError('the start values lie outside the model');
  let ssr = weightedSsr(problem, r);
  let lambda = 1e-3;
  let iterations = 0;
  let converged = false;
  normalEquations(problem, r, jac, jtj, jtr);
  while (iterations < maxIterations) {
    iterations++;
    let accepted = false;
    for (let attempt = 0; attempt < 40 && !accepted; attempt++) {
      damped.set(jtj);
      for (let a = 0; a < p; a++) {
        const d = jtj[a * p + a] as number;
        damped[a * p + a] = d + lambda * (d > 0 ? d : 1);
      }
      // r = data - model and jac = d model / dp, so the Gauss-Newton step is (J'WJ)^-1 J'W r.
      const step = choleskySolve(damped, jtr, p);
      if (!step) {
        lambda *= 10;
        continue;
      }
      const trial = new Float64Array(p);
      for (let a = 0; a < p; a++) trial[a] = (params[a] as number) + (step[a] as number);
      const inside = problem.evaluate(trial, rTry, null);
      const ssrTry = inside ? weightedSsr(problem, rTry) : Infinity;
      if (ssrTry <= ssr) {
        const decrease = (ssr - ssrTry) / Math.max(ssr, Number.MIN_VALUE);
        params = trial;
        ssr = ssrTry;
        problem.evaluate(params, r, jac);
        normalEquations(problem, r, jac, jtj, jtr);
        lambda = Math.max(lambda / 10, 1e-12);
        accepted = true;
        if (decrease < tolerance) converged = true;
      } else lambda *= 10;
    }
    if (!accepted) {
      // No step lowers the SSR any more: the minimum is reached to rounding.
      converged = true;
    }
    if (converged) break;
  }
  const inverse = spdInverse(jtj, p);
  if (!inverse) throw new LsqError('the fit is degenerate: its parameters cannot be told apart by the data');
  const residualVariance = ssr / (n - p);
  const covariance = inverse.map((v) => v * residualVariance);
  return { params, ssr, covariance, residualVariance, iterations, converged };
}
