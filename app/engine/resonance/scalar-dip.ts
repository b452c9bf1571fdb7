// Scalar (power) data: Lorentzian absorption dip on a sloped baseline,
//   P(f) = (b0 + b1 (f - f0)) (1 - A / (1 + u^2)), u = 2 QL (f - f0) / f0, fitted by weighted
//   non-linear least squares (the Lorentzian method of K. J. Petersan and S. M. Anlage,
//   J. Appl. Phys. 84, 3392 (1998)); weights 1 / (s_a^2 + s_m^2 P^2) from an additive plus
//   multiplicative noise model estimated from the residuals of a first fit (after J. D. Splett,
//   D. F. Vecchia, K. J. Coakley et al., IEEE Trans. MTT 51(3), 862 (2003)).
// Loaded Q is f0 over the full width at half depth; a 1 to 2.5 dB dip has no -3 dB points, so the
// 3 dB method is never used. Standard uncertainties come from the covariance of the fit (lsq.ts);
// they describe the noise of this trace only.

import { chordMinimum, levenbergMarquardt, LsqError, type LsqProblem, type LsqResult } from '../lsq';
import { notchQs, pointsWithin, type DipFit } from './trace';

export interface ScalarStart {
  f0Hz: number;
  widthHz: number;
  depth: number;
  baseline: number;
  slopePerHz: number;
}

/**
 * Where the scalar fits stop: when the next Gauss-Newton step would move no parameter (nor any
 * combination, such as QL) by more than 0.1 % of its standard uncertainty; that step is still
 * taken (lsq.ts). Against fits run to rounding, f0 and QL moved by at most 4e-5 and 8e-5 of their
 * standard uncertainties on the benchmark's and the reference tests' traces (tmp measurement);
 * 1 % instead moved QL by up to 1.2e-3 of u(QL) on noisy 501-point traces.
 */
const STEP_TOLERANCE = 0.001;
/**
 * Where the first, unweighted fit of a long trace stops (one that starts from the thinned fit, so
 * within a few standard uncertainties of its minimum): it only supplies the residuals for the noise
 * model, and residuals within a tenth of a standard uncertainty of that minimum (the last step still
 * taken) give the weighted fit the same answer to far under 1e-3 of u(f0) and u(QL). Against stopping
 * it at STEP_TOLERANCE, f0 and QL moved by at most 1.7e-5 of their standard uncertainties on 3,001- to
 * 20,001-point traces with up to five times the usual noise, and by under 1e-5 on the benchmark's (tmp
 * measurement); it saves about one pass over the trace in six. Short traces keep STEP_TOLERANCE:
 * there the first fit starts far off, and 0.1 moved their answers by up to 7.7e-4 of u.
 * That fit now steps with the thinned subset's J'WJ (chordMinimum), each step a pass without J'WJ,
 * and the weighted fit's first step too (startNormalMatrix): against both passes run to rounding,
 * f0 and QL then moved by at most 2.8e-5 of u and u(f0), u(QL) by 6.7e-6 of themselves on those
 * long traces, as before within the spread the stop already allowed (tmp measurement).
 */
const NOISE_PASS_STEP_TOLERANCE = 0.1;
/** Traces with more points than this get a first fit on an evenly thinned subset (a start only). */
const THIN_ABOVE_POINTS = 3000;
/** Points kept in that subset, at least. */
const THIN_POINTS = 1000;

/** Scaled scalar model, parameters [x0, g, A, c0, c1]: y = (c0 + c1 (x - x0)) (1 - A / (1 + u^2)),
 * u = g (x - x0); so f0 = fc + s x0 and QL = g f0 / (2 s) for x = (f - fc) / s. */
// Exported for the tests that keep its copies of the derivatives (evaluate, normalEquations, gradient)
// equal.
export function scalarProblem(x: Float64Array, y: Float64Array): LsqProblem {
  const n = x.length;
  return {
    rows: n,
    params: 5,
    // Set by the weighted fit; present from the start so the object keeps one shape (for V8).
    weights: undefined,
    evaluate(p, r, jac) {
      const x0 = p[0] as number;
      const g = p[1] as number;
      const a = p[2] as number;
      const c0 = p[3] as number;
      const c1 = p[4] as number;
      if (!(g > 0) || !(a > 0) || !(a < 1) || !(c0 > 0)) return false;
      if (!jac) {
        for (let i = 0; i < n; i++) {
          const dx = (x[i] as number) - x0;
          const u = g * dx;
          r[i] = (y[i] as number) - (c0 + c1 * dx) * (1 - a / (1 + u * u));
        }
        return true;
      }
      for (let i = 0, k = 0; i < n; i++, k += 5) {
        const dx = (x[i] as number) - x0;
        const u = g * dx;
        const l = 1 / (1 + u * u);
        const d = 1 - a * l;
        const b = c0 + c1 * dx;
        r[i] = (y[i] as number) - b * d;
        // d l / d u = -2 u l^2; u depends on x0 through -g and on g through dx.
        const bal2u = 2 * b * a * l * l * u;
        jac[k] = -c1 * d - bal2u * g;
        jac[k + 1] = bal2u * dx;
        jac[k + 2] = -b * l;
        jac[k + 3] = d;
        jac[k + 4] = dx * d;
      }
      return true;
    },
    // The same derivatives as `evaluate`, summed into J'WJ and J'Wr as they are made (the sums in the
    // order of lsq.ts normalEquationsAny and weightedSsr, so the fit's numbers are the same to the last bit).
    normalEquations(p, w, r, jtj, jtr) {
      const x0 = p[0] as number;
      const g = p[1] as number;
      const a = p[2] as number;
      const c0 = p[3] as number;
      const c1 = p[4] as number;
      if (!(g > 0) || !(a > 0) || !(a < 1) || !(c0 > 0)) return null;
      let s00 = 0,
        s10 = 0,
        s11 = 0,
        s20 = 0,
        s21 = 0,
        s22 = 0,
        s30 = 0,
        s31 = 0,
        s32 = 0,
        s33 = 0;
      let s40 = 0,
        s41 = 0,
        s42 = 0,
        s43 = 0,
        s44 = 0,
        t0 = 0,
        t1 = 0,
        t2 = 0,
        t3 = 0,
        t4 = 0,
        ssr = 0;
      for (let i = 0; i < n; i++) {
        const dx = (x[i] as number) - x0;
        const u = g * dx;
        const l = 1 / (1 + u * u);
        const d = 1 - a * l;
        const b = c0 + c1 * dx;
        const ri = (y[i] as number) - b * d;
        r[i] = ri;
        const bal2u = 2 * b * a * l * l * u;
        const j0 = -c1 * d - bal2u * g;
        const j1 = bal2u * dx;
        const j2 = -b * l;
        const j3 = d;
        const j4 = dx * d;
        // Unweighted, v = j exactly (1 * j is j), so leaving out the products changes no bit.
        let v0 = j0;
        let v1 = j1;
        let v2 = j2;
        let v3 = j3;
        let v4 = j4;
        let wr = ri;
        if (w) {
          const wi = w[i] as number;
          v0 = wi * j0;
          v1 = wi * j1;
          v2 = wi * j2;
          v3 = wi * j3;
          v4 = wi * j4;
          wr = wi * ri;
        }
        ssr += wr * ri;
        t0 += v0 * ri;
        t1 += v1 * ri;
        t2 += v2 * ri;
        t3 += v3 * ri;
        t4 += v4 * ri;
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
      }
      jtj[0] = s00;
      jtj[1] = jtj[5] = s10;
      jtj[2] = jtj[10] = s20;
      jtj[3] = jtj[15] = s30;
      jtj[4] = jtj[20] = s40;
      jtj[6] = s11;
      jtj[7] = jtj[11] = s21;
      jtj[8] = jtj[16] = s31;
      jtj[9] = jtj[21] = s41;
      jtj[12] = s22;
      jtj[13] = jtj[17] = s32;
      jtj[14] = jtj[22] = s42;
      jtj[18] = s33;
      jtj[19] = jtj[23] = s43;
      jtj[24] = s44;
      jtr[0] = t0;
      jtr[1] = t1;
      jtr[2] = t2;
      jtr[3] = t3;
      jtr[4] = t4;
      return ssr;
    },
    // normalEquations without J'WJ: the same expressions, so the same residuals, J'Wr and SSR.
    gradient(p, w, r, jtr) {
      const x0 = p[0] as number;
      const g = p[1] as number;
      const a = p[2] as number;
      const c0 = p[3] as number;
      const c1 = p[4] as number;
      if (!(g > 0) || !(a > 0) || !(a < 1) || !(c0 > 0)) return null;
      let t0 = 0,
        t1 = 0,
        t2 = 0,
        t3 = 0,
        t4 = 0,
        ssr = 0;
      for (let i = 0; i < n; i++) {
        const dx = (x[i] as number) - x0;
        const u = g * dx;
        const l = 1 / (1 + u * u);
        const d = 1 - a * l;
        const b = c0 + c1 * dx;
        const ri = (y[i] as number) - b * d;
        r[i] = ri;
        const bal2u = 2 * b * a * l * l * u;
        const j0 = -c1 * d - bal2u * g;
        const j1 = bal2u * dx;
        const j2 = -b * l;
        const j3 = d;
        const j4 = dx * d;
        let v0 = j0;
        let v1 = j1;
        let v2 = j2;
        let v3 = j3;
        let v4 = j4;
        let wr = ri;
        if (w) {
          const wi = w[i] as number;
          v0 = wi * j0;
          v1 = wi * j1;
          v2 = wi * j2;
          v3 = wi * j3;
          v4 = wi * j4;
          wr = wi * ri;
        }
        ssr += wr * ri;
        t0 += v0 * ri;
        t1 += v1 * ri;
        t2 += v2 * ri;
        t3 += v3 * ri;
        t4 += v4 * ri;
      }
      jtr[0] = t0;
      jtr[1] = t1;
      jtr[2] = t2;
      jtr[3] = t3;
      jtr[4] = t4;
      return ssr;
    },
  };
}

/** Every k-th point of a long trace, for the cheap first fit and an approximate J'WJ. */
interface Thinned {
  stride: number;
  problem: LsqProblem;
  /** Points of the whole trace per point of the subset: from the subset's J'WJ to the trace's. */
  scale: number;
}

function thinned(x: Float64Array, y: Float64Array): Thinned | null {
  const n = x.length;
  if (n <= THIN_ABOVE_POINTS) return null;
  const stride = Math.floor(n / THIN_POINTS);
  const m = Math.ceil(n / stride);
  const xs = new Float64Array(m);
  const ys = new Float64Array(m);
  for (let i = 0, k = 0; i < m; i++, k += stride) {
    xs[i] = x[k] as number;
    ys[i] = y[k] as number;
  }
  return { stride, problem: scalarProblem(xs, ys), scale: n / m };
}

/**
 * The whole trace's J'WJ at p, approximated by the subset's (with the whole trace's weights w at the
 * same points) times the points per subset point. Its rows are even samples of functions that vary
 * over a linewidth, hundreds of points: the sum over every k-th row times k is the sum over all rows
 * to a fraction of a percent, all a first step needs. Null outside the model.
 */
function thinnedNormalMatrix(
  thin: Thinned,
  p: Float64Array,
  w: Float64Array | undefined,
): Float64Array | null {
  const m = thin.problem.rows;
  let ws: Float64Array | undefined;
  if (w) {
    ws = new Float64Array(m);
    for (let i = 0, k = 0; i < m; i++, k += thin.stride) ws[i] = w[k] as number;
  }
  const jtj = new Float64Array(25);
  if (thin.problem.normalEquations?.(p, ws, new Float64Array(m), jtj, new Float64Array(5)) == null)
    return null;
  for (let k = 0; k < 25; k++) jtj[k] = (jtj[k] as number) * thin.scale;
  return jtj;
}

/**
 * Start for the fit of a long trace: the same unweighted fit on every k-th point, which costs a
 * k-th of an iteration on the whole trace and brings the start within a few standard
 * uncertainties of the minimum, with the subset's J'WJ there (scaled) for the steps on every point.
 * The answer is still the whole trace's minimum: only the start changes. Null when the subset
 * cannot be fitted.
 */
function roughStart(
  thin: Thinned,
  start: number[],
): { params: Float64Array; normalMatrix: Float64Array } | null {
  try {
    const params = levenbergMarquardt(thin.problem, start, { stepTolerance: 1 }).params;
    const normalMatrix = thinnedNormalMatrix(thin, params, undefined);
    return normalMatrix ? { params, normalMatrix } : null;
  } catch (e) {
    if (e instanceof LsqError) return null;
    throw e;
  }
}

// fitScalarDip's passes over the points, each a function of its own: V8 optimizes a small function
// after a few calls, while a large one with inlined callees takes a long compile, during which its
// loops would run unoptimized.

/**
 * Working arrays of fitScalarDip (x, y, weights and two of residuals), kept from one call to the
 * next: allocating them afresh, 400 kB for a 10,001-point trace, made each fit markedly slower in
 * a process where the garbage collector also has other work. One set suffices:
 * fitScalarDip runs to its end without calling anything that could call it again, it writes every
 * element before reading it, and none of these arrays outlives the call (the returned DipFit holds
 * numbers only). Not kept above SCRATCH_MAX_POINTS, so at most 4 MB stay allocated.
 */
let scratch: Float64Array[] = [];
const SCRATCH_MAX_POINTS = 100_000;

/** Five arrays of n numbers, each with its own storage; their contents are left from earlier calls. */
function scratchArrays(n: number): Float64Array[] {
  if (n > SCRATCH_MAX_POINTS) return Array.from({ length: 5 }, () => new Float64Array(n));
  if ((scratch[0]?.length ?? 0) < n) scratch = Array.from({ length: 5 }, () => new Float64Array(n));
  return scratch.map((a) => a.subarray(0, n));
}

/** The trace in the fit's scaled variables, into x and y: x = (f - fc) / s, y = P / ps. */
function scaleTrace(
  frequencyHz: ArrayLike<number>,
  power: ArrayLike<number>,
  fc: number,
  s: number,
  ps: number,
  x: Float64Array,
  y: Float64Array,
): void {
  const n = frequencyHz.length;
  for (let i = 0; i < n; i++) {
    x[i] = ((frequencyHz[i] as number) - fc) / s;
    y[i] = (power[i] as number) / ps;
  }
}

/**
 * Sums over the points for the noise model, into acc: sum m^2, sum m^4, sum r^2, sum r^2 m^2 for the
 * model m = y - r. Accumulated in acc inside the loop, not in local variables read after it: V8
 * compiles a long loop while its first run is still in it (on-stack replacement), and code after the
 * loop that had never run by then made every later call fall back out of the compiled loop (500 to
 * 700 deoptimizations in a profiling run of 10,001-point fits, over a third of their time; measured).
 */
function noiseMoments(y: Float64Array, r: Float64Array, acc: Float64Array): Float64Array {
  const n = y.length;
  acc.fill(0);
  for (let i = 0; i < n; i++) {
    const m = (y[i] as number) - (r[i] as number);
    const m2 = m * m;
    const e2 = (r[i] as number) * (r[i] as number);
    acc[0] = (acc[0] as number) + m2;
    acc[1] = (acc[1] as number) + m2 * m2;
    acc[2] = (acc[2] as number) + e2;
    acc[3] = (acc[3] as number) + e2 * m2;
  }
  return acc;
}

/** Additive and multiplicative noise variances s_a^2, s_m^2 from residuals r of the model y - r: least
 * squares of r^2 on (1, m^2), one term alone when the other would come out negative. */
export function noiseVariances(y: Float64Array, r: Float64Array): { va: number; vm: number } {
  const n = y.length;
  const [s12, s22, t1, t2] = noiseMoments(y, r, new Float64Array(4)) as unknown as [
    number,
    number,
    number,
    number,
  ];
  const s11 = n;
  const det = s11 * s22 - s12 * s12;
  let va = det > 0 ? (t1 * s22 - t2 * s12) / det : t1 / n;
  let vm = det > 0 ? (s11 * t2 - s12 * t1) / det : 0;
  if (va < 0 || vm < 0) {
    // One term alone explains the scatter: keep whichever fits it with a non-negative variance.
    if (vm <= 0) {
      va = t1 / n;
      vm = 0;
    } else {
      vm = t1 / s12;
      va = 0;
    }
  }
  return { va, vm };
}

/** Weights 1 / (s_a^2 + s_m^2 m^2) at the model m = y - r, into `weights`. */
export function noiseWeights(
  y: Float64Array,
  r: Float64Array,
  va: number,
  vm: number,
  weights: Float64Array,
): Float64Array {
  const n = y.length;
  for (let i = 0; i < n; i++) {
    const m = (y[i] as number) - (r[i] as number);
    weights[i] = 1 / Math.max(va + vm * m * m, 1e-300);
  }
  return weights;
}

function sumOfSquares(r: Float64Array): number {
  let sq = 0;
  for (let i = 0; i < r.length; i++) sq += (r[i] as number) * (r[i] as number);
  return sq;
}

/** Scalar Lorentzian fit on the given points (weighted by an additive + multiplicative noise model). */
export function fitScalarDip(
  frequencyHz: ArrayLike<number>,
  power: ArrayLike<number>,
  start: ScalarStart,
): DipFit {
  const n = frequencyHz.length;
  const fc = start.f0Hz;
  const s = start.widthHz;
  const ps = start.baseline;
  const [x, y, weights, r1, r2] = scratchArrays(n) as [
    Float64Array,
    Float64Array,
    Float64Array,
    Float64Array,
    Float64Array,
  ];
  const buffers: [Float64Array, Float64Array] = [r1, r2];
  scaleTrace(frequencyHz, power, fc, s, ps, x, y);
  const problem = scalarProblem(x, y);
  const startParams = [
    0,
    2 * (s / start.widthHz),
    Math.min(Math.max(start.depth, 0.02), 0.98),
    1,
    (start.slopePerHz * s) / ps,
  ];
  const thin = thinned(x, y);
  const rough = thin ? roughStart(thin, startParams) : null;
  // The first, unweighted fit only supplies the residuals for the noise model: on a long trace by
  // steps with the subset's J'WJ, each a pass without J'WJ; Levenberg-Marquardt if they fail.
  const chord = rough
    ? chordMinimum(problem, rough.params, rough.normalMatrix, {
        stepTolerance: NOISE_PASS_STEP_TOLERANCE,
        buffers,
      })
    : null;
  let full: LsqResult | null = null;
  let first: { params: Float64Array; residuals: Float64Array };
  if (chord) first = chord;
  else
    first = full = levenbergMarquardt(problem, rough?.params ?? startParams, {
      stepTolerance: rough ? NOISE_PASS_STEP_TOLERANCE : STEP_TOLERANCE,
      buffers,
    });
  // Noise model s_a^2 + s_m^2 m^2 from the squared residuals of the first fit, then refit.
  const { va, vm } = noiseVariances(y, first.residuals);
  if (va + vm > 0) problem.weights = noiseWeights(y, first.residuals, va, vm, weights);
  // The weighted fit, its first step with the subset's J'WJ. Without weights (residuals all zero),
  // the first fit is the answer when it was a full one.
  const result =
    !problem.weights && full
      ? full
      : levenbergMarquardt(problem, first.params, {
          stepTolerance: STEP_TOLERANCE,
          buffers,
          startNormalMatrix: (thin && thinnedNormalMatrix(thin, first.params, problem.weights)) ?? undefined,
        });
  const [x0, g, a, c0, c1] = Array.from(result.params) as [number, number, number, number, number];
  const cov = result.covariance;
  const f0Hz = fc + s * x0;
  const loadedQ = (g * f0Hz) / (2 * s);
  const uF0 = s * Math.sqrt(cov[0] as number);
  // QL = g (fc + s x0) / (2 s): gradient over (x0, g).
  const dQdx0 = g / 2;
  const dQdg = f0Hz / (2 * s);
  const varQ =
    dQdx0 * dQdx0 * (cov[0] as number) +
    2 * dQdx0 * dQdg * (cov[1] as number) +
    dQdg * dQdg * (cov[6] as number);
  const uA = Math.sqrt(cov[12] as number);
  const sq = sumOfSquares(result.residuals);
  const widthHz = f0Hz / loadedQ;
  const notch = notchQs(loadedQ, 1 - Math.sqrt(1 - a), uA / a);
  return {
    method: 'scalar-lorentzian',
    f0Hz,
    f0UncertaintyHz: uF0,
    loadedQ,
    loadedQUncertainty: Math.sqrt(Math.max(varQ, 0)),
    depthDb: -10 * Math.log10(1 - a),
    depthFraction: a,
    baselineAtF0: c0 * ps,
    baselineSlopePerHz: (c1 * ps) / s,
    residualRms: Math.sqrt(sq / n) / c0,
    halfDepthBandwidthHz: widthHz,
    twoToneResolutionHz: widthHz / Math.sqrt(3),
    ...notch,
    qCircleDiameter: null,
    pointsPerLinewidth: pointsWithin(frequencyHz, f0Hz - widthHz / 2, f0Hz + widthHz / 2),
    pointsUsed: n,
    iterations: result.iterations,
  };
}
