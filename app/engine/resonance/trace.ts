// A swept trace through an absorption meter and what the resonance fit reports of it: the trace
// kinds, the fitted dip, the report of every dip, the refusal, and small helpers the methods share.
// The methods themselves (candidate search, scalar dip, complex Q-circle, model choice) are the
// sibling modules, each citing its source.

export interface ScalarTrace {
  kind: 'scalar';
  frequencyHz: ArrayLike<number>;
  /** Power at the detector, linear (any scale), falling at the dip. */
  power: ArrayLike<number>;
}

export interface ComplexTrace {
  kind: 'complex';
  frequencyHz: ArrayLike<number>;
  re: ArrayLike<number>;
  im: ArrayLike<number>;
}

export type Trace = ScalarTrace | ComplexTrace;

export type ResonanceErrorCode =
  | 'invalid'
  | 'non-monotonic'
  | 'too-few-points'
  | 'no-dip'
  | 'edge'
  | 'undersampled'
  | 'no-fit'
  | 'untrustworthy';

export class ResonanceError extends Error {
  constructor(
    readonly code: ResonanceErrorCode,
    message: string,
  ) {
    super(message);
    this.name = 'ResonanceError';
  }
}

export interface DipFit {
  method: 'scalar-lorentzian' | 'complex-circle';
  f0Hz: number;
  /** Standard uncertainty of f0 from the fit's covariance. */
  f0UncertaintyHz: number;
  loadedQ: number;
  loadedQUncertainty: number;
  /** Depth of the dip in power, dB (positive). */
  depthDb: number;
  /** Fraction of the baseline power absorbed at f0 (A of the scalar model). */
  depthFraction: number;
  /** Baseline power at f0 (scalar: in the trace's units; complex: |S_V|^2) and its slope per Hz. */
  baselineAtF0: number;
  baselineSlopePerHz: number;
  /** Scalar: RMS of residuals relative to the baseline. Complex: MAT 58 weighted RMS of |S - model|. */
  residualRms: number;
  /** Full width at half depth, f0 / QL. */
  halfDepthBandwidthHz: number;
  /** Smallest spacing of two equal tones still seen as two dips: f0 / (QL sqrt 3). */
  twoToneResolutionHz: number;
  /** Unloaded and external Q of a notch resonator, when the depth lets them be told apart. */
  unloadedQ: number | null;
  externalQ: number | null;
  /** Complex fits: the Q-circle diameter relative to |S_V| (MAT 58 eq. 31). */
  qCircleDiameter: number | null;
  /** Points of the trace inside the half-depth width. */
  pointsPerLinewidth: number;
  pointsUsed: number;
  iterations: number;
  /** Sum of squared residuals, unweighted, in the trace's units (power, or S for complex fits). */
  residualSumOfSquares?: number;
  /** Number of fitted parameters. */
  parameters?: number;
  /** Complex fits with the cable modelled: electrical delay and its standard uncertainty, s. */
  electricalDelayS?: number;
  electricalDelayUncertaintyS?: number;
}

/** Which model a fit asks for: chosen from the data, the complex Q-circle, or the magnitude dip. */
export type FitModel = 'auto' | 'complex' | 'magnitude';

/** The model a fit used, why, and how the other model agreed where both were fitted. */
export interface ModelChoice {
  requested: FitModel;
  used: 'complex' | 'magnitude';
  reason: string;
  /** The other model's fit of the main dip, when both applied. */
  alternative: DipFit | null;
  agreement: {
    f0DifferenceHz: number;
    /** The f0 difference over the combined standard uncertainty of the two fits. */
    f0DifferenceSigma: number;
    loadedQRatio: number;
    agree: boolean;
  } | null;
}

/** The fit's judgement of itself. */
export interface FitJudgement {
  ok: boolean;
  /** Each reason the fit cannot be trusted, in words for the user. */
  problems: string[];
  /** Standard deviation of the level at the baseline, from its second differences (trace units). */
  baselineNoise: number;
  /** Residuals against that noise: sum r^2 / ((N - p) noise^2). */
  reducedChiSquare: number;
}

export interface ResonanceReport {
  /** The deepest dip: the meter's resonance. */
  main: DipFit;
  /** Every other dip: spurious responses of the meter, deepest first. */
  spurious: DipFit[];
  notes: string[];
  /** Absent in reports stored before the fit chose its model and judged itself. */
  model?: ModelChoice;
  judgement?: FitJudgement;
}

export interface FitOptions {
  /** Least number of points inside the half-depth width (default 4). */
  minPointsPerLinewidth?: number;
  /** The model (default auto: chosen from the data). */
  model?: FitModel;
}

export const MIN_POINTS = 8;

export function requireTrace(trace: Trace): { f: Float64Array; power: Float64Array } {
  const n = trace.frequencyHz.length;
  if (n < MIN_POINTS)
    throw new ResonanceError('too-few-points', `a trace needs at least ${MIN_POINTS} points (it has ${n})`);
  const f = Float64Array.from(trace.frequencyHz);
  const power = new Float64Array(n);
  if (trace.kind === 'scalar') {
    if (trace.power.length !== n)
      throw new ResonanceError('invalid', 'frequency and level columns differ in length');
    for (let i = 0; i < n; i++) power[i] = trace.power[i] as number;
  } else {
    if (trace.re.length !== n || trace.im.length !== n)
      throw new ResonanceError('invalid', 'frequency and S-parameter columns differ in length');
    for (let i = 0; i < n; i++) {
      const re = trace.re[i] as number;
      const im = trace.im[i] as number;
      power[i] = re * re + im * im;
    }
  }
  for (let i = 0; i < n; i++) {
    const fi = f[i] as number;
    if (!Number.isFinite(fi) || fi <= 0)
      throw new ResonanceError('invalid', `point ${i + 1}: frequency ${String(fi)} is not a positive number`);
    if (i > 0 && !(fi > (f[i - 1] as number)))
      throw new ResonanceError(
        'non-monotonic',
        `point ${i + 1}: frequency ${fi} Hz does not rise above the point before (${f[i - 1]} Hz); a sweep must rise steadily`,
      );
    const pi = power[i] as number;
    if (!Number.isFinite(pi) || pi <= 0)
      throw new ResonanceError('invalid', `point ${i + 1}: level ${String(pi)} is not a positive power`);
  }
  return { f, power };
}

export function median(values: Float64Array | number[]): number {
  const s = Float64Array.from(values).sort();
  const m = s.length >> 1;
  return s.length % 2 ? (s[m] as number) : ((s[m - 1] as number) + (s[m] as number)) / 2;
}

export function pointsWithin(f: ArrayLike<number>, lowHz: number, highHz: number): number {
  let c = 0;
  for (let i = 0; i < f.length; i++) {
    const v = f[i] as number;
    if (v >= lowHz && v <= highHz) c++;
  }
  return c;
}

/** Q0 and Qe of a notch resonator from its Q-circle diameter d (relative to the detuned level),
 * only when the depth determines d well (a relative uncertainty of the depth under 20 % and
 * 0.01 < d < 0.99, common practice). */
export function notchQs(
  loadedQ: number,
  diameter: number,
  relativeUncertainty: number,
): { unloadedQ: number | null; externalQ: number | null } {
  if (!(diameter > 0.01 && diameter < 0.99) || !(relativeUncertainty < 0.2))
    return { unloadedQ: null, externalQ: null };
  return { unloadedQ: loadedQ / (1 - diameter), externalQ: loadedQ / diameter };
}

export function pick(values: ArrayLike<number>, indices: number[]): Float64Array {
  const out = new Float64Array(indices.length);
  indices.forEach((k, i) => (out[i] = values[k] as number));
  return out;
}

export function describeHz(hz: number): string {
  if (hz >= 1e9) return `${(hz / 1e9).toPrecision(7)} GHz`;
  if (hz >= 1e6) return `${(hz / 1e6).toPrecision(6)} MHz`;
  if (hz >= 1e3) return `${(hz / 1e3).toPrecision(4)} kHz`;
  return `${hz.toPrecision(3)} Hz`;
}
