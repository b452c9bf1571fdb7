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
// region (QL > 0, a depth below 1) instead of clamping them; and a statistical stop (stepTolerance).
// For long traces, passes without J'WJ where a normal matrix from a thinned subset will do
// (chordMinimum, startNormalMatrix).

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
  /**
   * Optional fused form of `evaluate` with the Jacobian: fills r as `evaluate` does and, from the
   * same derivatives, J'WJ (params x params, row-major, both triangles) and J'Wr with the weights w
   * (all 1 when absent), without storing J; returns the weighted SSR sum w_i r_i^2 (summed in row
   * order, as weightedSsr does), or null when p is outside the physical region. When given, the
   * solver uses it instead of `evaluate(p, r, jac)`: an n x p Jacobian written out and read back,
   * and a further pass over the residuals, cost about as much as the model's own arithmetic.
   */
  normalEquations?(
    p: Float64Array,
    w: Float64Array | undefined,
    r: Float64Array,
    jtj: Float64Array,
    jtr: Float64Array,
  ): number | null;
  /**
   * Optional: fills r as `evaluate` does and J'Wr with the weights w (all 1 when absent), without
   * J'WJ; returns the weighted SSR, or null outside the physical region. Such a pass costs about
   * half of one that forms J'WJ too; `chordMinimum` and the `startNormalMatrix` option use it where
   * a normal matrix known from elsewhere will do.
   */
  gradient?(p: Float64Array, w: Float64Array | undefined, r: Float64Array, jtr: Float64Array): number | null;
}

export interface LsqOptions {
  maxIterations?: number;
  /** Stop when the relative decrease of the weighted SSR falls below this. */
  relativeTolerance?: number;
  /**
   * Statistical stop, off when absent: stop once the Gauss-Newton step from the current point would
   * move no linear combination of the parameters by more than this many of its own standard
   * uncertainties, i.e. sqrt(d' J'WJ d / s^2) <= stepTolerance with s^2 from the part of the residual
   * the step cannot remove: sqrt(params) times the relative offset of D. M. Bates and D. G. Watts
   * (Nonlinear Regression Analysis and Its Applications, Wiley 1988, ch. 2; from memory). That last
   * step is still taken (kept only if it lowers the SSR) without recomputing the Jacobian, so the
   * answer lies far closer to the minimum than the tolerance; the covariance then uses the Jacobian
   * of the point one such step before, which differs from the solution's by far less than its noise.
   */
  stepTolerance?: number;
  /**
   * An approximation of J'WJ at `start` (say from an evenly thinned subset of the rows, scaled to
   * all of them), for a problem with a `gradient` method: the start then costs a pass without J'WJ,
   * and the first step solves with this matrix. Every later point gets its exact J'WJ, and the
   * statistical stop and the covariance wait for one, so the answer is that of an exact start to
   * within what the stop allows; a poorer approximation only makes the first step land less close.
   */
  startNormalMatrix?: Float64Array;
  /**
   * Two arrays of `rows` numbers to hold the residuals (current and trial) instead of new ones: their
   * contents are overwritten before being read, and the result's residuals is one of them. For a
   * caller fitting many long traces, which saves allocating and collecting them on every fit.
   */
  buffers?: [Float64Array, Float64Array];
}

export interface LsqResult {
  params: Float64Array;
  /** Weighted sum of squared residuals at the solution. */
  ssr: number;
  /** Covariance of the parameters, params x params, row-major: s^2 (J'WJ)^-1. */
  covariance: Float64Array;
  /** Residual variance factor s^2 = ssr / (rows - params). */
  residualVariance: number;
  /** Residuals (data - model) at `params`. */
  residuals: Float64Array;
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

/** J'WJ (lower triangle only) and J'Wr, row by row, for any number of parameters. */
function normalEquationsAny(
  p: number,
  n: number,
  w: Float64Array | undefined,
  r: Float64Array,
  jac: Float64Array,
  jtj: Float64Array,
  jtr: Float64Array,
): void {
  jtj.fill(0);
  jtr.fill(0);
  for (let i = 0; i < n; i++) {
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
}

/** Copies the lower triangle of the p x p jtj to the upper. Apart from normalEquationsAny's loop over
 * the rows because V8 compiles a long loop while its first run is still in it, and code after the
 * loop that had not run by then sent later calls back out of the compiled code (up to 142 times in
 * one run of the fit benchmark, measured). */
function mirrorLower(jtj: Float64Array, p: number): void {
  for (let a = 0; a < p; a++) for (let b = a + 1; b < p; b++) jtj[a * p + b] = jtj[b * p + a] as number;
}

/** normalEquationsAny for 6 parameters (the complex circle fit), written out so every sum lives in a
 * local variable: V8 keeps those in registers but not the elements of the p x p array (about four
 * times faster on a 10,001-point trace). The scalar dip sums its own in one pass (resonance.ts). */
function normalEquations6(
  n: number,
  w: Float64Array | undefined,
  r: Float64Array,
  jac: Float64Array,
  jtj: Float64Array,
  jtr: Float64Array,
): void {
  let s00 = 0,
    s10 = 0,
    s11 = 0,
    s20 = 0,
    s21 = 0,
    s22 = 0,
    s30 = 0,
    s31 = 0,
    s32 = 0,
    s33 = 0,
    s40 = 0;
  let s41 = 0,
    s42 = 0,
    s43 = 0,
    s44 = 0,
    s50 = 0,
    s51 = 0,
    s52 = 0,
    s53 = 0,
    s54 = 0,
    s55 = 0;
  let t0 = 0,
    t1 = 0,
    t2 = 0,
    t3 = 0,
    t4 = 0,
    t5 = 0;
  for (let i = 0, k = 0; i < n; i++, k += 6) {
    const wi = w ? (w[i] as number) : 1;
    const j0 = jac[k] as number;
    const j1 = jac[k + 1] as number;
    const j2 = jac[k + 2] as number;
    const j3 = jac[k + 3] as number;
    const j4 = jac[k + 4] as number;
    const j5 = jac[k + 5] as number;
    const v0 = wi * j0;
    const v1 = wi * j1;
    const v2 = wi * j2;
    const v3 = wi * j3;
    const v4 = wi * j4;
    const v5 = wi * j5;
    const ri = r[i] as number;
    t0 += v0 * ri;
    t1 += v1 * ri;
    t2 += v2 * ri;
    t3 += v3 * ri;
    t4 += v4 * ri;
    t5 += v5 * ri;
    s00 += v0 * j0;
    s10 += v1 * j0;
    s11 += v1 * j1;
    s20 += v2 * j0;
    s21 += v2 * j1;
    s22 += v2 * j2;
    s30 += v3 * j0;
    s31 += v3 * j1;
    s32 += v3 * j2;
    s33 += v3 * j3;
    s40 += v4 * j0;
    s41 += v4 * j1;
    s42 += v4 * j2;
    s43 += v4 * j3;
    s44 += v4 * j4;
    s50 += v5 * j0;
    s51 += v5 * j1;
    s52 += v5 * j2;
    s53 += v5 * j3;
    s54 += v5 * j4;
    s55 += v5 * j5;
  }
  jtj.set([
    s00,
    s10,
    s20,
    s30,
    s40,
    s50,
    s10,
    s11,
    s21,
    s31,
    s41,
    s51,
    s20,
    s21,
    s22,
    s32,
    s42,
    s52,
    s30,
    s31,
    s32,
    s33,
    s43,
    s53,
    s40,
    s41,
    s42,
    s43,
    s44,
    s54,
    s50,
    s51,
    s52,
    s53,
    s54,
    s55,
  ]);
  jtr.set([t0, t1, t2, t3, t4, t5]);
}

/** J'WJ and J'Wr at the current point. */
function normalEquations(
  problem: LsqProblem,
  r: Float64Array,
  jac: Float64Array,
  jtj: Float64Array,
  jtr: Float64Array,
): void {
  const { params: p, rows: n, weights: w } = problem;
  if (p === 6) normalEquations6(n, w, r, jac, jtj, jtr);
  else {
    normalEquationsAny(p, n, w, r, jac, jtj, jtr);
    mirrorLower(jtj, p);
  }
}

/** The caller's two residual arrays (checked to hold n numbers each), or two new ones. */
function residualBuffers(
  buffers: [Float64Array, Float64Array] | undefined,
  n: number,
): [Float64Array, Float64Array] {
  if (!buffers) return [new Float64Array(n), new Float64Array(n)];
  if (buffers[0].length !== n || buffers[1].length !== n || buffers[0] === buffers[1])
    throw new LsqError(`the residual buffers must be two arrays of ${n} numbers`);
  return [buffers[0], buffers[1]];
}

function weightedSsr(problem: LsqProblem, r: Float64Array): number {
  const w = problem.weights;
  const n = problem.rows;
  let s = 0;
  // Two loops rather than a test per row; unweighted, 1 * ri * ri is ri * ri to the last bit.
  if (w)
    for (let i = 0; i < n; i++) {
      const ri = r[i] as number;
      s += (w[i] as number) * ri * ri;
    }
  else
    for (let i = 0; i < n; i++) {
      const ri = r[i] as number;
      s += ri * ri;
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
  const stepTolerance = options.stepTolerance;
  let params = Float64Array.from(start);
  // Two residual buffers and two sets of normal equations (with, unless the problem fuses them, two
  // Jacobians): a trial is evaluated with its derivatives into the spare set, and an accepted trial
  // swaps them in rather than being evaluated a second time.
  const fused = problem.normalEquations?.bind(problem);
  let [r, rTry] = residualBuffers(options.buffers, n);
  let jac = fused ? null : new Float64Array(n * p);
  let jacTry = fused ? null : new Float64Array(n * p);
  let jtj = new Float64Array(p * p);
  let jtr = new Float64Array(p);
  let jtjTry = new Float64Array(p * p);
  let jtrTry = new Float64Array(p);
  const damped = new Float64Array(p * p);
  const trial = new Float64Array(p);
  /** Residuals and derivatives at q into the spare set; the weighted SSR there, null outside the
   * model. Unfused, the normal equations are formed by `acceptTry` only, so a rejected trial does not
   * pay for them. */
  const evaluateTry = (q: Float64Array): number | null => {
    if (fused) return fused(q, problem.weights, rTry, jtjTry, jtrTry);
    return problem.evaluate(q, rTry, jacTry) ? weightedSsr(problem, rTry) : null;
  };
  const acceptTry = (): void => {
    [r, rTry] = [rTry, r];
    [jac, jacTry] = [jacTry, jac];
    [jtj, jtjTry] = [jtjTry, jtj];
    [jtr, jtrTry] = [jtrTry, jtr];
    if (jac) normalEquations(problem, r, jac, jtj, jtr);
  };
  const startGradient = options.startNormalMatrix && problem.gradient?.bind(problem);
  /** Whether jtj is J'WJ at `params`, not the approximation given for the start. */
  let exact = !startGradient;
  const ssrStart = startGradient ? startGradient(params, problem.weights, r, jtr) : evaluateTry(params);
  if (ssrStart === null) throw new LsqError('the start values lie outside the model');
  let ssr = ssrStart;
  if (startGradient) jtj.set(options.startNormalMatrix as Float64Array);
  else acceptTry();
  let lambda = 1e-3;
  let iterations = 0;
  let converged = false;
  while (iterations < maxIterations) {
    iterations++;
    if (stepTolerance !== undefined && exact) {
      const step = choleskySolve(jtj, jtr, p);
      if (step) {
        // d'J'Wr = d'J'WJd: the SSR the Gauss-Newton step would remove.
        let removable = 0;
        for (let a = 0; a < p; a++) removable += (step[a] as number) * (jtr[a] as number);
        const s2 = Math.max(ssr - removable, 0) / (n - p);
        if (removable <= stepTolerance * stepTolerance * s2) {
          for (let a = 0; a < p; a++) trial[a] = (params[a] as number) + (step[a] as number);
          if (problem.evaluate(trial, rTry, null)) {
            const ssrTry = weightedSsr(problem, rTry);
            if (ssrTry <= ssr) {
              params = Float64Array.from(trial);
              ssr = ssrTry;
              [r, rTry] = [rTry, r];
            }
          }
          converged = true;
          break;
        }
      }
    }
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
      for (let a = 0; a < p; a++) trial[a] = (params[a] as number) + (step[a] as number);
      const ssrTry = evaluateTry(trial) ?? Infinity;
      if (ssrTry <= ssr) {
        const decrease = (ssr - ssrTry) / Math.max(ssr, Number.MIN_VALUE);
        params = Float64Array.from(trial);
        ssr = ssrTry;
        acceptTry();
        exact = true;
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
  if (!exact) {
    // No step left the start: its exact J'WJ, for the covariance.
    if (evaluateTry(params) === null) throw new LsqError('the start values lie outside the model');
    acceptTry();
  }
  const inverse = spdInverse(jtj, p);
  if (!inverse) throw new LsqError('the fit is degenerate: its parameters cannot be told apart by the data');
  const residualVariance = ssr / (n - p);
  const covariance = inverse.map((v) => v * residualVariance);
  return { params, ssr, covariance, residualVariance, residuals: r, iterations, converged };
}

export interface ChordResult {
  params: Float64Array;
  /** Residuals (data - model) at `params`. */
  residuals: Float64Array;
  /** Weighted SSR at `params`. */
  ssr: number;
  iterations: number;
}

/**
 * The least-squares minimum near `start` by Gauss-Newton steps that all solve with one fixed
 * approximation `normalMatrix` of J'WJ (the chord, or simplified Newton, method: J. E. Dennis and
 * R. B. Schnabel, Numerical Methods for Unconstrained Optimization and Nonlinear Equations, SIAM
 * 1996, ch. 5; from memory), so each step costs a `gradient` pass and no J'WJ. It stops on
 * `stepTolerance` as levenbergMarquardt does, the step measured with the fixed matrix, and still
 * takes that last step when it lowers the SSR. With a start near the minimum and a matrix close to
 * J'WJ there it converges about as fast as Gauss-Newton. No covariance: for a fit that only has to
 * supply the residuals at its minimum. Returns null, for the caller to fall back on
 * levenbergMarquardt, when a step leaves the model or raises the SSR, the matrix is not positive
 * definite, or maxIterations steps do not meet the tolerance.
 */
export function chordMinimum(
  problem: LsqProblem,
  start: ArrayLike<number>,
  normalMatrix: Float64Array,
  options: Pick<LsqOptions, 'maxIterations' | 'buffers'> & { stepTolerance: number },
): ChordResult | null {
  const gradient = problem.gradient?.bind(problem);
  if (!gradient) throw new LsqError('chordMinimum needs a problem with a gradient method');
  const n = problem.rows;
  const p = problem.params;
  if (n <= p) throw new LsqError(`${n} data for ${p} parameters: a fit needs more data than parameters`);
  const w = problem.weights;
  const tolerance2 = options.stepTolerance * options.stepTolerance;
  const maxIterations = options.maxIterations ?? 10;
  let params = Float64Array.from(start);
  let [r, rTry] = residualBuffers(options.buffers, n);
  const jtr = new Float64Array(p);
  const trial = new Float64Array(p);
  let ssr = gradient(params, w, r, jtr);
  if (ssr === null) return null;
  for (let iterations = 1; iterations <= maxIterations; iterations++) {
    const step = choleskySolve(normalMatrix, jtr, p);
    if (!step) return null;
    // As in levenbergMarquardt's statistical stop, with the fixed matrix.
    let removable = 0;
    for (let a = 0; a < p; a++) removable += (step[a] as number) * (jtr[a] as number);
    const s2 = Math.max(ssr - removable, 0) / (n - p);
    for (let a = 0; a < p; a++) trial[a] = (params[a] as number) + (step[a] as number);
    if (removable <= tolerance2 * s2) {
      if (problem.evaluate(trial, rTry, null)) {
        const ssrTry = weightedSsr(problem, rTry);
        if (ssrTry <= ssr) {
          params = Float64Array.from(trial);
          ssr = ssrTry;
          [r, rTry] = [rTry, r];
        }
      }
      return { params, residuals: r, ssr, iterations };
    }
    const ssrTry = gradient(trial, w, rTry, jtr);
    if (ssrTry === null || !(ssrTry <= ssr)) return null;
    params = Float64Array.from(trial);
    ssr = ssrTry;
    [r, rTry] = [rTry, r];
  }
  return null;
}
