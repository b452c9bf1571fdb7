// Complex S21 data: S = S_V + b / (1 + j QL t), t = 2 (f - f0) / f0, with the complex leakage
// (detuned) vector S_V and the rotation of the resonance circle in the complex b; weighted with
// MAT 58's angular weights 1 / (1 + (QL t)^2), fit, re-weight, fit, re-weight, fit to convergence
// (A. P. Gregory, "Q-factor Measurement by using a Vector Network Analyser", NPL Report MAT 58
// (2021), sections 2.2 and 2.4, eqs. (21) and (28); the NLQFIT6 procedure).
// Notch (absorption) coupling: Q-circle diameter d = |b| / |S_V|, Q0 = QL / (1 - d), Qe = QL / d,
// so 1/QL = 1/Q0 + 1/Qe (MAT 58 section 2.5; Pozar, Microwave Engineering, 4th ed., 6.7).

import { levenbergMarquardt, type LsqProblem } from '../lsq';
import { pointsWithin, type DipFit } from './trace';

/** MAT 58 complex fit (NLQFIT6 form) on the given points. */
export function fitComplexDip(
  frequencyHz: ArrayLike<number>,
  re: ArrayLike<number>,
  im: ArrayLike<number>,
  start: { f0Hz: number; widthHz: number },
): DipFit {
  const n = frequencyHz.length;
  const fc = start.f0Hz;
  const s = start.widthHz;
  const x = new Float64Array(n);
  for (let i = 0; i < n; i++) x[i] = ((frequencyHz[i] as number) - fc) / s;
  // Parameters [aRe, aIm, bRe, bIm, x0, g]: S = a + b / (1 + j u), u = g (x - x0) = QL t.
  const problem: LsqProblem = {
    rows: 2 * n,
    params: 6,
    evaluate(p, r, jac) {
      const aRe = p[0] as number;
      const aIm = p[1] as number;
      const bRe = p[2] as number;
      const bIm = p[3] as number;
      const x0 = p[4] as number;
      const g = p[5] as number;
      if (!(g > 0)) return false;
      for (let i = 0; i < n; i++) {
        const dx = (x[i] as number) - x0;
        const u = g * dx;
        const den = 1 + u * u;
        // y = 1 / (1 + j u) = (1 - j u) / (1 + u^2)
        const yRe = 1 / den;
        const yIm = -u / den;
        const mRe = aRe + bRe * yRe - bIm * yIm;
        const mIm = aIm + bRe * yIm + bIm * yRe;
        r[2 * i] = (re[i] as number) - mRe;
        r[2 * i + 1] = (im[i] as number) - mIm;
        if (jac) {
          // dS/du = b * (-j) y^2
          const y2Re = yRe * yRe - yIm * yIm;
          const y2Im = 2 * yRe * yIm;
          const tRe = bRe * y2Re - bIm * y2Im;
          const tIm = bRe * y2Im + bIm * y2Re;
          const dRe = tIm; // (-j)(tRe + j tIm) = tIm - j tRe
          const dIm = -tRe;
          const k = 2 * i * 6;
          jac.set([1, 0, yRe, -yIm, -g * dRe, dx * dRe], k);
          jac.set([0, 1, yIm, yRe, -g * dIm, dx * dIm], k + 6);
        }
      }
      return true;
    },
  };
  // Start: the linear least-squares a and b for the located centre and width.
  const g0 = 2;
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
  let params: ArrayLike<number> = [a0.re, a0.im, b0.re, b0.im, 0, g0];
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
  const cov = result.covariance;
  const f0Hz = fc + s * x0;
  const loadedQ = (g * f0Hz) / (2 * s);
  const dQdx0 = g / 2;
  const dQdg = f0Hz / (2 * s);
  const varQ =
    dQdx0 * dQdx0 * (cov[4 * 6 + 4] as number) +
    2 * dQdx0 * dQdg * (cov[4 * 6 + 5] as number) +
    dQdg * dQdg * (cov[5 * 6 + 5] as number);
  const r = new Float64Array(2 * n);
  problem.evaluate(result.params, r, null);
  let num = 0;
  let den = 0;
  for (let i = 0; i < n; i++) {
    const w = weights[2 * i] as number;
    num += w * ((r[2 * i] as number) ** 2 + (r[2 * i + 1] as number) ** 2);
    den += w;
  }
  const detuned = Math.hypot(aRe, aIm);
  const tuned = Math.hypot(aRe + bRe, aIm + bIm);
  const diameter = Math.hypot(bRe, bIm) / detuned;
  const widthHz = f0Hz / loadedQ;
  const a = 1 - (tuned / detuned) ** 2;
  const notch =
    diameter < 1
      ? { unloadedQ: loadedQ / (1 - diameter), externalQ: loadedQ / diameter }
      : { unloadedQ: null, externalQ: null };
  return {
    method: 'complex-circle',
    f0Hz,
    f0UncertaintyHz: s * Math.sqrt(cov[4 * 6 + 4] as number),
    loadedQ,
    loadedQUncertainty: Math.sqrt(Math.max(varQ, 0)),
    depthDb: 20 * Math.log10(detuned / tuned),
    depthFraction: a,
    baselineAtF0: detuned * detuned,
    baselineSlopePerHz: 0,
    residualRms: Math.sqrt(num / den),
    halfDepthBandwidthHz: widthHz,
    twoToneResolutionHz: widthHz / Math.sqrt(3),
    ...notch,
    qCircleDiameter: diameter,
    pointsPerLinewidth: pointsWithin(Float64Array.from(frequencyHz), f0Hz - widthHz / 2, f0Hz + widthHz / 2),
    pointsUsed: n,
    iterations: result.iterations,
  };
}
