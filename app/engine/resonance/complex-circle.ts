// Complex S21 data: S = S_V + b / (1 + j QL t), t = 2 (f - f0) / f0, with the complex leakage
// (detuned) vector S_V and the rotation of the resonance circle in the complex b; weighted with
// MAT 58's angular weights 1 / (1 + (QL t)^2), fit, re-weight, fit, re-weight, fit to convergence
// (A. P. Gregory, "Q-factor Measurement by using a Vector Network Analyser", NPL Report MAT 58
// (2021), sections 2.2 and 2.4, eqs. (21) and (28); the NLQFIT6 procedure).
// The measurement as a network analyser sees it adds a cable: an electrical delay tau turns the
// phase by -2 pi f tau, and the baseline's magnitude may tilt. The extended model multiplies the
// circle by (1 + k x) exp(-j p x), x = (f - fc) / s, so tau = p / (2 pi s); tau and k start from
// the off-resonance part of the trace (baseline.ts) and are refined in the fit (MAT 58 section 2.6
// discusses the uncalibrated line's delay and loss; the form here is our own).
// Notch (absorption) coupling: Q-circle diameter d = |b| / |S_V|, Q0 = QL / (1 - d), Qe = QL / d,
// so 1/QL = 1/Q0 + 1/Qe (MAT 58 section 2.5; Pozar, Microwave Engineering, 4th ed., 6.7).

import { levenbergMarquardt, spdInverse, type LsqProblem } from '../lsq';
import { pointsWithin, type DipFit } from './trace';

export interface ComplexStart {
  f0Hz: number;
  widthHz: number;
  /** Electrical delay estimated from the off-resonance phase, s (0 when unknown). */
  delayS?: number;
}

/**
 * The circle model on scaled frequencies x, parameters [aRe, aIm, bRe, bIm, x0, g] and, extended,
 * [k, p]: S = (1 + k x) exp(-j p x) (a + b / (1 + j u)), u = g (x - x0) = QL t.
 */
function circleProblem(
  x: Float64Array,
  re: ArrayLike<number>,
  im: ArrayLike<number>,
  extended: boolean,
): LsqProblem {
  const n = x.length;
  const np = extended ? 8 : 6;
  return {
    rows: 2 * n,
    params: np,
    evaluate(p, r, jac) {
      const aRe = p[0] as number;
      const aIm = p[1] as number;
      const bRe = p[2] as number;
      const bIm = p[3] as number;
      const x0 = p[4] as number;
      const g = p[5] as number;
      const k = extended ? (p[6] as number) : 0;
      const ph = extended ? (p[7] as number) : 0;
      if (!(g > 0)) return false;
      for (let i = 0; i < n; i++) {
        const xi = x[i] as number;
        const dx = xi - x0;
        const u = g * dx;
        const den = 1 + u * u;
        // y = 1 / (1 + j u) = (1 - j u) / (1 + u^2)
        const yRe = 1 / den;
        const yIm = -u / den;
        const cRe = aRe + bRe * yRe - bIm * yIm;
        const cIm = aIm + bRe * yIm + bIm * yRe;
        // E = (1 + k x) exp(-j p x)
        const mag = 1 + k * xi;
        const eRe = extended ? mag * Math.cos(ph * xi) : 1;
        const eIm = extended ? -mag * Math.sin(ph * xi) : 0;
        const mRe = eRe * cRe - eIm * cIm;
        const mIm = eRe * cIm + eIm * cRe;
        r[2 * i] = (re[i] as number) - mRe;
        r[2 * i + 1] = (im[i] as number) - mIm;
        if (jac) {
          // dC/du = b (-j) y^2
          const y2Re = yRe * yRe - yIm * yIm;
          const y2Im = 2 * yRe * yIm;
          const tRe = bRe * y2Re - bIm * y2Im;
          const tIm = bRe * y2Im + bIm * y2Re;
          const dRe = tIm;
          const dIm = -tRe;
          // Each derivative of C times E.
          const mul = (zr: number, zi: number): [number, number] => [
            eRe * zr - eIm * zi,
            eRe * zi + eIm * zr,
          ];
          const [a1r, a1i] = mul(1, 0);
          const [a2r, a2i] = mul(0, 1);
          const [b1r, b1i] = mul(yRe, yIm);
          const [b2r, b2i] = mul(-yIm, yRe);
          const [ur, ui] = mul(dRe, dIm);
          const k0 = 2 * i * np;
          const k1 = k0 + np;
          jac[k0] = a1r;
          jac[k1] = a1i;
          jac[k0 + 1] = a2r;
          jac[k1 + 1] = a2i;
          jac[k0 + 2] = b1r;
          jac[k1 + 2] = b1i;
          jac[k0 + 3] = b2r;
          jac[k1 + 3] = b2i;
          jac[k0 + 4] = -g * ur;
          jac[k1 + 4] = -g * ui;
          jac[k0 + 5] = dx * ur;
          jac[k1 + 5] = dx * ui;
          if (extended) {
            // dS/dk = x exp(-j p x) C = x / (1 + k x) S; dS/dp = -j x S.
            const sk = xi / mag;
            jac[k0 + 6] = sk * mRe;
            jac[k1 + 6] = sk * mIm;
            jac[k0 + 7] = xi * mIm;
            jac[k1 + 7] = -xi * mRe;
          }
        }
      }
      return true;
    },
  };
}

/** Linear least-squares a and b of S = a + b / (1 + j g0 x) for the located centre and width. */
function linearStart(x: Float64Array, re: ArrayLike<number>, im: ArrayLike<number>, g0: number): number[] {
  const n = x.length;
  let syy = 0;
  let sy = { re: 0, im: 0 };
  let ss = { re: 0, im: 0 };
  let sys = { re: 0, im: 0 };
  for (let i = 0; i < n; i++) {
    const u = g0 * (x[i] as number);
    const den = 1 + u * u;
    const yRe = 1 / den;
    const yIm = -u / den;
    const sRe = re[i] as number;
    const sIm = im[i] as number;
    syy += yRe * yRe + yIm * yIm;
    sy = { re: sy.re + yRe, im: sy.im + yIm };
    ss = { re: ss.re + sRe, im: ss.im + sIm };
    // conj(y) * S
    sys = { re: sys.re + yRe * sRe + yIm * sIm, im: sys.im + yRe * sIm - yIm * sRe };
  }
  // Normal equations [n, sy; conj(sy), syy] [a; b] = [ss; sys]
  const detRe = n * syy - (sy.re * sy.re + sy.im * sy.im);
  const numB = {
    re: n * sys.re - (sy.re * ss.re + sy.im * ss.im),
    im: n * sys.im - (sy.re * ss.im - sy.im * ss.re),
  };
  const b0 = { re: numB.re / detRe, im: numB.im / detRe };
  const a0 = {
    re: (ss.re - (sy.re * b0.re - sy.im * b0.im)) / n,
    im: (ss.im - (sy.re * b0.im + sy.im * b0.re)) / n,
  };
  return [a0.re, a0.im, b0.re, b0.im, 0, g0];
}

/**
 * Covariance of a fit weighted by MAT 58's angular weights W when the noise is white with one
 * variance s^2 on every point (a network analyser's trace noise, common practice): the sandwich
 * (J'WJ)^-1 J'W^2 J (J'WJ)^-1 s^2, s^2 from the unweighted residuals (JCGM 102:2011 6.3 for the
 * propagation; the weights are not the inverse variances, so s^2 (J'WJ)^-1 would understate it).
 */
function sandwichCovariance(problem: LsqProblem, params: Float64Array, w: Float64Array): Float64Array | null {
  const rows = problem.rows;
  const np = problem.params;
  const r = new Float64Array(rows);
  const jac = new Float64Array(rows * np);
  if (!problem.evaluate(params, r, jac)) return null;
  const a = new Float64Array(np * np);
  const b = new Float64Array(np * np);
  let ssr = 0;
  for (let i = 0; i < rows; i++) {
    const wi = w[i] as number;
    ssr += (r[i] as number) ** 2;
    for (let j = 0; j < np; j++) {
      const jj = jac[i * np + j] as number;
      for (let k = 0; k <= j; k++) {
        const jk = jac[i * np + k] as number;
        a[j * np + k] = (a[j * np + k] as number) + wi * jj * jk;
        b[j * np + k] = (b[j * np + k] as number) + wi * wi * jj * jk;
      }
    }
  }
  for (let j = 0; j < np; j++)
    for (let k = 0; k < j; k++) {
      a[k * np + j] = a[j * np + k] as number;
      b[k * np + j] = b[j * np + k] as number;
    }
  const ai = spdInverse(a, np);
  if (!ai) return null;
  const s2 = ssr / (rows - np);
  const t = new Float64Array(np * np);
  for (let i = 0; i < np; i++)
    for (let j = 0; j < np; j++) {
      let v = 0;
      for (let k = 0; k < np; k++) v += (ai[i * np + k] as number) * (b[k * np + j] as number);
      t[i * np + j] = v;
    }
  const cov = new Float64Array(np * np);
  for (let i = 0; i < np; i++)
    for (let j = 0; j < np; j++) {
      let v = 0;
      for (let k = 0; k < np; k++) v += (t[i * np + k] as number) * (ai[k * np + j] as number);
      cov[i * np + j] = v * s2;
    }
  return cov;
}

/**
 * MAT 58 complex fit (NLQFIT6 form) on the given points; with `extended`, the delay and magnitude
 * tilt of the baseline are parameters too.
 */
export function fitComplexDip(
  frequencyHz: ArrayLike<number>,
  re: ArrayLike<number>,
  im: ArrayLike<number>,
  start: ComplexStart,
  extended = false,
): DipFit {
  const n = frequencyHz.length;
  const fc = start.f0Hz;
  const s = start.widthHz;
  const x = new Float64Array(n);
  for (let i = 0; i < n; i++) x[i] = ((frequencyHz[i] as number) - fc) / s;
  const problem = circleProblem(x, re, im, extended);
  const np = problem.params;
  const g0 = 2;
  let params: ArrayLike<number>;
  if (extended) {
    // The start of a and b from the trace with the estimated delay taken out.
    const p0 = 2 * Math.PI * (start.delayS ?? 0) * s;
    const dRe = new Float64Array(n);
    const dIm = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const c = Math.cos(p0 * (x[i] as number));
      const sn = Math.sin(p0 * (x[i] as number));
      const vr = re[i] as number;
      const vi = im[i] as number;
      dRe[i] = vr * c - vi * sn;
      dIm[i] = vr * sn + vi * c;
    }
    params = [...linearStart(x, dRe, dIm, g0), 0, p0];
  } else params = linearStart(x, re, im, g0);
  const weights = new Float64Array(2 * n);
  const angularWeights = (p: ArrayLike<number>) => {
    for (let i = 0; i < n; i++) {
      const u = (p[5] as number) * ((x[i] as number) - (p[4] as number));
      const w = 1 / (1 + u * u);
      weights[2 * i] = w;
      weights[2 * i + 1] = w;
    }
    problem.weights = weights;
  };
  // MAT 58 loop plan "fwfwc": fit unweighted, weight, fit, weight, fit to convergence.
  let result = levenbergMarquardt(problem, params, { maxIterations: 50 });
  for (let pass = 0; pass < 2; pass++) {
    params = result.params;
    angularWeights(params);
    result = levenbergMarquardt(problem, params);
  }
  const [aRe, aIm, bRe, bIm, x0, g] = Array.from(result.params) as [
    number,
    number,
    number,
    number,
    number,
    number,
  ];
  const k = extended ? (result.params[6] as number) : 0;
  const ph = extended ? (result.params[7] as number) : 0;
  const cov = sandwichCovariance(problem, result.params, weights) ?? result.covariance;
  const f0Hz = fc + s * x0;
  const loadedQ = (g * f0Hz) / (2 * s);
  const dQdx0 = g / 2;
  const dQdg = f0Hz / (2 * s);
  const varQ =
    dQdx0 * dQdx0 * (cov[4 * np + 4] as number) +
    2 * dQdx0 * dQdg * (cov[4 * np + 5] as number) +
    dQdg * dQdg * (cov[5 * np + 5] as number);
  const r = new Float64Array(2 * n);
  problem.evaluate(result.params, r, null);
  let num = 0;
  let den = 0;
  let ssr = 0;
  for (let i = 0; i < n; i++) {
    const w = weights[2 * i] as number;
    const e2 = (r[2 * i] as number) ** 2 + (r[2 * i + 1] as number) ** 2;
    num += w * e2;
    den += w;
    ssr += e2;
  }
  // At f0 the tilt factor is 1 + k x0.
  const tilt = 1 + k * x0;
  const detuned = Math.hypot(aRe, aIm);
  const tuned = Math.hypot(aRe + bRe, aIm + bIm);
  const diameter = Math.hypot(bRe, bIm) / detuned;
  const widthHz = f0Hz / loadedQ;
  const a = 1 - (tuned / detuned) ** 2;
  const notch =
    diameter < 1
      ? { unloadedQ: loadedQ / (1 - diameter), externalQ: loadedQ / diameter }
      : { unloadedQ: null, externalQ: null };
  const fit: DipFit = {
    method: 'complex-circle',
    f0Hz,
    f0UncertaintyHz: s * Math.sqrt(cov[4 * np + 4] as number),
    loadedQ,
    loadedQUncertainty: Math.sqrt(Math.max(varQ, 0)),
    depthDb: 20 * Math.log10(detuned / tuned),
    depthFraction: a,
    baselineAtF0: (detuned * tilt) ** 2,
    baselineSlopePerHz: (2 * k * tilt * detuned * detuned) / s,
    residualRms: Math.sqrt(num / den),
    halfDepthBandwidthHz: widthHz,
    twoToneResolutionHz: widthHz / Math.sqrt(3),
    ...notch,
    qCircleDiameter: diameter,
    pointsPerLinewidth: pointsWithin(Float64Array.from(frequencyHz), f0Hz - widthHz / 2, f0Hz + widthHz / 2),
    pointsUsed: n,
    iterations: result.iterations,
    residualSumOfSquares: ssr,
    parameters: np,
  };
  if (extended) {
    fit.electricalDelayS = ph / (2 * Math.PI * s);
    fit.electricalDelayUncertaintyS = Math.sqrt(cov[7 * np + 7] as number) / (2 * Math.PI * s);
  }
  return fit;
}
