// Overlapping dips fitted together: the scalar model of scalar-dip.ts with one Lorentzian term per
// dip on one sloped baseline, P(f) = (b0 + b1 (f - fc)) (1 - sum A_k / (1 + u_k^2)), so a neighbour
// a few linewidths away neither hides in the baseline nor pulls the main dip (Petersan and Anlage
// 1998 for the line shape; the sum of absorptions is that of independent weak resonances, common
// practice). Weighted, as the single-dip fit, by the additive plus multiplicative noise model from
// the residuals of an unweighted first fit (Splett, Vecchia, Coakley et al. 2003).

import { levenbergMarquardt, type LsqProblem } from '../lsq';
import { noiseVariances, noiseWeights } from './scalar-dip';
import { notchQs, pointsWithin, type DipFit } from './trace';

export interface JointStart {
  f0Hz: number;
  widthHz: number;
  depth: number;
}

/** Parameters [c0, c1, (x0, g, A) per dip] on x = (f - fc) / s, y = P / ps. */
function jointProblem(x: Float64Array, y: Float64Array, dips: number): LsqProblem {
  const n = x.length;
  const np = 2 + 3 * dips;
  return {
    rows: n,
    params: np,
    evaluate(p, r, jac) {
      const c0 = p[0] as number;
      const c1 = p[1] as number;
      if (!(c0 > 0)) return false;
      let total = 0;
      for (let k = 0; k < dips; k++) {
        const g = p[3 + 3 * k] as number;
        const a = p[4 + 3 * k] as number;
        if (!(g > 0) || !(a > 0) || !(a < 1)) return false;
        total += a;
      }
      if (!(total < 1.5)) return false;
      for (let i = 0; i < n; i++) {
        const xi = x[i] as number;
        const b = c0 + c1 * xi;
        let d = 1;
        for (let k = 0; k < dips; k++) {
          const u = (p[3 + 3 * k] as number) * (xi - (p[2 + 3 * k] as number));
          d -= (p[4 + 3 * k] as number) / (1 + u * u);
        }
        r[i] = (y[i] as number) - b * d;
        if (!jac) continue;
        const row = i * np;
        jac[row] = d;
        jac[row + 1] = xi * d;
        for (let k = 0; k < dips; k++) {
          const x0 = p[2 + 3 * k] as number;
          const g = p[3 + 3 * k] as number;
          const a = p[4 + 3 * k] as number;
          const dx = xi - x0;
          const u = g * dx;
          const l = 1 / (1 + u * u);
          const bal2u = 2 * b * a * l * l * u;
          jac[row + 2 + 3 * k] = -bal2u * g;
          jac[row + 3 + 3 * k] = bal2u * dx;
          jac[row + 4 + 3 * k] = -b * l;
        }
      }
      return true;
    },
  };
}

/** Fits the dips together on the given points; one DipFit per dip, in the order given. */
export function fitJointDips(
  frequencyHz: ArrayLike<number>,
  power: ArrayLike<number>,
  starts: JointStart[],
): DipFit[] {
  const n = frequencyHz.length;
  const first = starts[0] as JointStart;
  const fc = first.f0Hz;
  const s = first.widthHz;
  let ps = 0;
  for (let i = 0; i < n; i++) ps = Math.max(ps, power[i] as number);
  const x = new Float64Array(n);
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    x[i] = ((frequencyHz[i] as number) - fc) / s;
    y[i] = (power[i] as number) / ps;
  }
  const problem = jointProblem(x, y, starts.length);
  const start = [1, 0];
  for (const d of starts)
    start.push((d.f0Hz - fc) / s, (2 * s) / d.widthHz, Math.min(Math.max(d.depth, 0.02), 0.9));
  const unweighted = levenbergMarquardt(problem, start, { maxIterations: 200 });
  const { va, vm } = noiseVariances(y, unweighted.residuals);
  if (va + vm > 0) problem.weights = noiseWeights(y, unweighted.residuals, va, vm, new Float64Array(n));
  const result = problem.weights
    ? levenbergMarquardt(problem, unweighted.params, { maxIterations: 200 })
    : unweighted;
  const np = problem.params;
  const cov = result.covariance;
  const c0 = result.params[0] as number;
  const c1 = result.params[1] as number;
  let sq = 0;
  for (let i = 0; i < n; i++) sq += (result.residuals[i] as number) ** 2;
  return starts.map((_, k) => {
    const i0 = 2 + 3 * k;
    const x0 = result.params[i0] as number;
    const g = result.params[i0 + 1] as number;
    const a = result.params[i0 + 2] as number;
    const f0Hz = fc + s * x0;
    const loadedQ = (g * f0Hz) / (2 * s);
    const dQdx0 = g / 2;
    const dQdg = f0Hz / (2 * s);
    const varQ =
      dQdx0 * dQdx0 * (cov[i0 * np + i0] as number) +
      2 * dQdx0 * dQdg * (cov[i0 * np + i0 + 1] as number) +
      dQdg * dQdg * (cov[(i0 + 1) * np + i0 + 1] as number);
    const uA = Math.sqrt(cov[(i0 + 2) * np + i0 + 2] as number);
    const widthHz = f0Hz / loadedQ;
    const base = c0 + c1 * x0;
    return {
      method: 'scalar-lorentzian' as const,
      f0Hz,
      f0UncertaintyHz: s * Math.sqrt(cov[i0 * np + i0] as number),
      loadedQ,
      loadedQUncertainty: Math.sqrt(Math.max(varQ, 0)),
      depthDb: -10 * Math.log10(1 - a),
      depthFraction: a,
      baselineAtF0: base * ps,
      baselineSlopePerHz: (c1 * ps) / s,
      residualRms: Math.sqrt(sq / n) / base,
      halfDepthBandwidthHz: widthHz,
      twoToneResolutionHz: widthHz / Math.sqrt(3),
      ...notchQs(loadedQ, 1 - Math.sqrt(1 - a), uA / a),
      qCircleDiameter: null,
      pointsPerLinewidth: pointsWithin(frequencyHz, f0Hz - widthHz / 2, f0Hz + widthHz / 2),
      pointsUsed: n,
      iterations: result.iterations,
      parameters: np,
    };
  });
}
