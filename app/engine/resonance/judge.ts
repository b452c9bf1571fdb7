// A fit's judgement of itself: the residuals against the noise of the baseline (reduced
// chi-square), the fitted linewidth against the sweep and the point density across it, the fitted
// depth against the data's own minimum, f0 inside the sweep and determined by the data. Each
// failure is a sentence for the user; a fit with any is refused where it would be used.
// The limits are common practice for a dip fit (no published source): residuals up to about 1.7
// times the noise (reduced chi-square 3) allow for a baseline noise estimated from a few hundred
// points and for mild non-white noise; the depth within 15 % of the mean of the points nearest f0.

import { describeHz, type DipFit, type FitJudgement } from './trace';

/** The data a fit is judged against. */
export interface JudgedData {
  /** Every frequency of the trace, for the span. */
  traceHz: Float64Array;
  /** The fitted points: frequency and power (|S|^2 for complex traces). */
  frequencyHz: ArrayLike<number>;
  power: ArrayLike<number>;
  /** Standard deviation of the fitted quantity at the baseline: power, or each part of S. */
  noise: number;
  minPointsPerLinewidth: number;
  /** Dips fitted together with this one: their absorption is part of the model. */
  others?: DipFit[];
}

export const CHI_SQUARE_LIMIT = 3;
const DEPTH_TOLERANCE = 0.15;

/** The scalar model's power at f, from the fit's figures. */
function scalarModel(fit: DipFit, f: number, others: DipFit[] = []): number {
  let d = 1;
  for (const o of [fit, ...others]) {
    const u = (2 * o.loadedQ * (f - o.f0Hz)) / o.f0Hz;
    d -= o.depthFraction / (1 + u * u);
  }
  return (fit.baselineAtF0 + fit.baselineSlopePerHz * (f - fit.f0Hz)) * d;
}

export function judgeFit(fit: DipFit, data: JudgedData): FitJudgement {
  const problems: string[] = [];
  const { traceHz, frequencyHz: f, power } = data;
  const low = traceHz[0] as number;
  const high = traceHz[traceHz.length - 1] as number;
  const span = high - low;
  const width = fit.halfDepthBandwidthHz;
  const n = f.length;
  // Noise floor: a noiseless synthetic trace still has rounding in its last digits.
  const noise = Math.max(
    data.noise,
    1e-9 * Math.abs(fit.baselineAtF0) ** (fit.method === 'complex-circle' ? 0.5 : 1),
  );
  let ssr = 0;
  let dof = n - (fit.parameters ?? 5);
  if (fit.method === 'complex-circle' && fit.residualSumOfSquares !== undefined) {
    ssr = fit.residualSumOfSquares;
    dof = 2 * n - (fit.parameters ?? 6);
  } else
    for (let i = 0; i < n; i++)
      ssr += ((power[i] as number) - scalarModel(fit, f[i] as number, data.others)) ** 2;
  const reducedChiSquare = ssr / Math.max(dof, 1) / (noise * noise);
  if (!Number.isFinite(fit.f0Hz) || !Number.isFinite(fit.loadedQ) || !(fit.loadedQ > 0)) {
    problems.push('the fit gave no finite resonance');
    return { ok: false, problems, baselineNoise: data.noise, reducedChiSquare };
  }
  if (fit.f0Hz < low || fit.f0Hz > high)
    problems.push(
      `the fitted resonance ${describeHz(fit.f0Hz)} lies outside the sweep (${describeHz(low)} to ${describeHz(high)})`,
    );
  if (width > span)
    problems.push(`the fitted width ${describeHz(width)} is wider than the ${describeHz(span)} sweep`);
  if (fit.pointsPerLinewidth < data.minPointsPerLinewidth)
    problems.push(
      `only ${fit.pointsPerLinewidth} points lie across the fitted half-depth width of ${describeHz(width)} (at least ${data.minPointsPerLinewidth} are needed)`,
    );
  if (!(fit.f0UncertaintyHz < 0.25 * width))
    problems.push(
      `the data do not determine f0: u(f0) ${describeHz(fit.f0UncertaintyHz)} against a linewidth of ${describeHz(width)}`,
    );
  if (!(fit.loadedQUncertainty < 0.25 * fit.loadedQ))
    problems.push(
      `the data do not determine the loaded Q: u(QL) ${fit.loadedQUncertainty.toPrecision(2)} for QL ${fit.loadedQ.toFixed(0)}`,
    );
  if (reducedChiSquare > CHI_SQUARE_LIMIT)
    problems.push(
      `the residuals are ${Math.sqrt(reducedChiSquare).toPrecision(2)} times the noise of the baseline (reduced chi-square ${reducedChiSquare.toPrecision(3)}): the model does not describe the trace`,
    );
  // Depth against the data: the mean of the points within an eighth of a linewidth of f0 (at least
  // the three nearest) against the model's mean there.
  const near: number[] = [];
  for (let i = 0; i < n; i++) if (Math.abs((f[i] as number) - fit.f0Hz) <= width / 8) near.push(i);
  if (near.length < 3) {
    const order = Array.from({ length: n }, (_, i) => i).sort(
      (a, b) => Math.abs((f[a] as number) - fit.f0Hz) - Math.abs((f[b] as number) - fit.f0Hz),
    );
    near.splice(0, near.length, ...order.slice(0, Math.min(3, n)));
  }
  let dataMean = 0;
  let modelMean = 0;
  let baseMean = 0;
  for (const i of near) {
    const fi = f[i] as number;
    dataMean += power[i] as number;
    modelMean += scalarModel(fit, fi, data.others);
    baseMean += fit.baselineAtF0 + fit.baselineSlopePerHz * (fi - fit.f0Hz);
  }
  dataMean /= near.length;
  modelMean /= near.length;
  baseMean /= near.length;
  const powerNoise = fit.method === 'complex-circle' ? 2 * Math.sqrt(Math.max(baseMean, 0)) * noise : noise;
  const allowed = Math.max(
    DEPTH_TOLERANCE * fit.depthFraction * baseMean,
    (4 * powerNoise) / Math.sqrt(near.length),
  );
  if (Math.abs(dataMean - modelMean) > allowed && dataMean > 0 && baseMean > 0) {
    const dataDb = -10 * Math.log10(dataMean / baseMean);
    const modelDb = -10 * Math.log10(modelMean / baseMean);
    problems.push(
      `the fitted depth ${modelDb.toFixed(2)} dB at f0 does not match the data's own minimum of ${dataDb.toFixed(2)} dB there`,
    );
  }
  return { ok: problems.length === 0, problems, baselineNoise: data.noise, reducedChiSquare };
}
