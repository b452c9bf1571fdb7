// A meter's history over the years: straight-line drift of the error at each check frequency,
// a pooled relative drift across the band, steps (a dropped meter), and the health of the dip.
// Time is a plain number (years from an epoch the caller chooses); the engine has no clock.
//
// Sources:
// - Weighted least squares of a straight line and the standard deviations of its coefficients:
//   NIST/SEMATECH e-Handbook of Statistical Methods, 4.4.3 (least squares) and 4.4.3.2
//   (weighted least squares, from memory); checked against the NIST StRD dataset Norris.
// - Prediction interval for a single future observation (e-Handbook 4.5.1.2, "How can I predict
//   the value and estimate the uncertainty of a single response?"): y0 +- t(1-a/2, n-2) sigma_p,
//   sigma_p^2 = sigma^2 + sigma_f^2, sigma_f^2 = sigma^2 (1/n + (x0 - xbar)^2 / Sxx); the same
//   closed form as Montgomery, Peck & Vining, Introduction to Linear Regression Analysis, eq. 2.45.
// - Step threshold, dip and Q thresholds: this product's stated choices (common practice, no
//   published source); they are constants below so a report can quote them.

import { tQuantile } from './distributions';

/** One observation for a straight-line fit: x (e.g. years), y, and optionally y's standard
 * uncertainty, which sets its weight 1/u^2. */
export interface FitPoint {
  x: number;
  y: number;
  u?: number;
}

/**
 * How the coefficients' uncertainties are scaled.
 * - 'residual': by the scatter about the line (variance of unit weight from the residuals), as
 *   the e-Handbook and the NIST StRD certified values do;
 * - 'residual-or-stated': never smaller than the points' stated uncertainties imply (scale =
 *   max(1, reduced chi-square)); a lab should not claim its history is better known than each
 *   check says. Needs every point's u.
 */
export type FitScale = 'residual' | 'residual-or-stated';

export interface LineFit {
  n: number;
  /** Residual degrees of freedom, n - 2. */
  dof: number;
  intercept: number;
  slope: number;
  uIntercept: number;
  uSlope: number;
  covInterceptSlope: number;
  /** sqrt(sum r^2 / (n - 2)), unweighted residuals, in y's unit. */
  residualSd: number;
  /** sqrt(sum w r^2 / (n - 2)) when points carry u (the Birge ratio), else null. */
  birgeRatio: number | null;
  /** Variance of unit weight used for the uncertainties (s^2, or max(s^2, 1)). */
  unitVariance: number;
  /** Weighted mean of x, sum of weights, weighted Sxx: what a prediction needs. */
  xMean: number;
  sumWeights: number;
  sxx: number;
  weighted: boolean;
}

/** Weighted straight-line fit y = intercept + slope x. Needs at least 3 points (one residual
 * degree of freedom) and two distinct x. Centred sums keep it exact enough for StRD Norris. */
export function fitLine(points: readonly FitPoint[], scale: FitScale = 'residual'): LineFit {
  const n = points.length;
  if (n < 3) throw new Error(`a straight-line fit needs at least 3 points (got ${n})`);
  const weighted = points.every((p) => p.u !== undefined);
  if (!weighted && points.some((p) => p.u !== undefined))
    throw new Error('either every point or no point carries an uncertainty');
  const w = points.map((p) => {
    if (!weighted) return 1;
    const u = p.u as number;
    if (!(u > 0) || !Number.isFinite(u)) throw new Error(`point uncertainty must be positive (got ${u})`);
    return 1 / (u * u);
  });
  for (const p of points)
    if (!Number.isFinite(p.x) || !Number.isFinite(p.y)) throw new Error('fit points must be finite');
  // Plain loops: a meter's step tests fit thousands of short lines (the sums are the same).
  let sw = 0;
  let swx = 0;
  let swy = 0;
  for (let i = 0; i < n; i++) {
    const p = points[i] as FitPoint;
    const wi = w[i] as number;
    sw += wi;
    swx += wi * p.x;
    swy += wi * p.y;
  }
  const xMean = swx / sw;
  const yMean = swy / sw;
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < n; i++) {
    const p = points[i] as FitPoint;
    const wi = w[i] as number;
    sxx += wi * (p.x - xMean) ** 2;
    sxy += wi * (p.x - xMean) * (p.y - yMean);
  }
  if (!(sxx > 0)) throw new Error('a straight-line fit needs at least two distinct x values');
  const slope = sxy / sxx;
  const intercept = yMean - slope * xMean;
  let ssr = 0;
  let chi2 = 0;
  for (let i = 0; i < n; i++) {
    const p = points[i] as FitPoint;
    const r = p.y - (intercept + slope * p.x);
    ssr += r * r;
    chi2 += (w[i] as number) * r * r;
  }
  const dof = n - 2;
  const s2 = chi2 / dof;
  const unitVariance = scale === 'residual-or-stated' && weighted ? Math.max(s2, 1) : s2;
  return {
    n,
    dof,
    intercept,
    slope,
    uIntercept: Math.sqrt(unitVariance * (1 / sw + (xMean * xMean) / sxx)),
    uSlope: Math.sqrt(unitVariance / sxx),
    covInterceptSlope: (-unitVariance * xMean) / sxx,
    residualSd: Math.sqrt(ssr / dof),
    birgeRatio: weighted ? Math.sqrt(s2) : null,
    unitVariance,
    xMean,
    sumWeights: sw,
    sxx,
    weighted,
  };
}

export interface Prediction {
  value: number;
  /** Standard deviation of the fitted line at x0 (sigma_f). */
  sdMean: number;
  /** Standard deviation of a single new observation at x0 (sigma_p). */
  sdPrediction: number;
  /** t(1 - a/2, n - 2) for the coverage asked. */
  k: number;
  halfWidth: number;
  coverage: number;
}

/** e-Handbook 4.5.1.2 prediction interval of one new observation at x0. `uNew` is the new
 * observation's own standard uncertainty for a weighted fit (its weight), ignored otherwise. */
export function predict(fit: LineFit, x0: number, coverage = 0.95, uNew?: number): Prediction {
  return predictor(fit, coverage, uNew)(x0);
}

/** The prediction of `predict` as a function of x0, with what does not depend on x0 (the t
 * quantile above all) worked out once: a band or a projected exit asks at hundreds of x0. */
export function predictor(fit: LineFit, coverage = 0.95, uNew?: number): (x0: number) => Prediction {
  if (!(coverage > 0 && coverage < 1)) throw new Error(`coverage must lie between 0 and 1 (got ${coverage})`);
  // A new observation weighs 1/uNew^2 in a weighted fit (the mean weight if uNew is not given).
  const varNew = !fit.weighted
    ? fit.unitVariance
    : uNew !== undefined
      ? fit.unitVariance * uNew * uNew
      : (fit.unitVariance * fit.n) / fit.sumWeights;
  const k = tQuantile((1 + coverage) / 2, fit.dof);
  return (x0) => {
    const varMean = fit.unitVariance * (1 / fit.sumWeights + (x0 - fit.xMean) ** 2 / fit.sxx);
    const sdPrediction = Math.sqrt(varMean + varNew);
    return {
      value: fit.intercept + fit.slope * x0,
      sdMean: Math.sqrt(varMean),
      sdPrediction,
      k,
      halfWidth: k * sdPrediction,
      coverage,
    };
  };
}

/**
 * First x at or after `fromX` (within `horizon`) where the prediction band y +- k sigma_p leaves
 * [-tolerance, +tolerance]; `fromX` itself when already outside; null when it stays inside.
 * The band is scanned in steps of horizon/600 and the crossing refined by bisection.
 */
export function projectedExit(
  fit: LineFit,
  fromX: number,
  tolerance: number,
  options: { coverage?: number; uNew?: number; horizon?: number } = {},
): number | null {
  const coverage = options.coverage ?? 0.95;
  const horizon = options.horizon ?? 30;
  const at = predictor(fit, coverage, options.uNew);
  const outside = (x: number) => {
    const p = at(x);
    return p.value + p.halfWidth > tolerance || p.value - p.halfWidth < -tolerance;
  };
  if (outside(fromX)) return fromX;
  const steps = 600;
  let lo = fromX;
  for (let i = 1; i <= steps; i++) {
    const x = fromX + (horizon * i) / steps;
    if (outside(x)) {
      let hi = x;
      for (let j = 0; j < 50; j++) {
        const mid = (lo + hi) / 2;
        if (outside(mid)) hi = mid;
        else lo = mid;
      }
      return hi;
    }
    lo = x;
  }
  return null;
}

// ---------------------------------------------------------------------------------------------
// A meter's history: segments, steps, per-frequency fits, pooled drift.

/** A step is a check whose as-found error lies outside the 99.73 % prediction interval (the
 * "3 sigma" of a normal distribution) from the checks before it... */
export const STEP_COVERAGE = 0.9973;
/** ...at no fewer than this fraction of the frequencies tested: a dropped or knocked meter moves
 * across its band, while one stray point is a misreading. */
export const STEP_MIN_FRACTION = 0.5;
/** A check is tested only when its segment already holds this many earlier checks: with fewer
 * there is no drift line to predict from, and comparing with the previous check alone mistakes a
 * fast steady drift for a step. */
export const STEP_MIN_POINTS = 3;

export interface HistoryPoint {
  frequencyHz: number;
  phase: 'as-found' | 'as-left';
  errorPpm: number;
  /** Standard uncertainty of the error, ppm. */
  uPpm: number;
  tolerancePpm: number;
}

export interface HistoryCheck {
  tYears: number;
  adjusted: boolean;
  points: HistoryPoint[];
}

export interface SeriesObservation {
  tYears: number;
  phase: 'as-found' | 'as-left';
  errorPpm: number;
  uPpm: number;
  /** Segment number: a new segment starts after an adjustment or a step. */
  segment: number;
}

export interface FrequencyDrift {
  frequencyHz: number;
  /** Tolerance at the newest check, ppm of the frequency. */
  tolerancePpm: number;
  observations: SeriesObservation[];
  /** Fit over the current segment (null with fewer than 3 observations there). */
  fit: LineFit | null;
  /** Standard uncertainty of the newest observation: the weight of a future check. */
  uNewPpm: number;
}

export interface StepTest {
  frequencyHz: number;
  observedPpm: number;
  predictedPpm: number;
  limitPpm: number;
  basis: 'prediction';
  flagged: boolean;
}

export interface StepFinding {
  checkIndex: number;
  tYears: number;
  tests: StepTest[];
  flaggedCount: number;
  isStep: boolean;
}

export interface PooledDrift {
  /** Relative drift common to the band, ppm per year, with its standard uncertainty. */
  driftPpmPerYear: number;
  uDriftPpmPerYear: number;
  n: number;
  frequencies: number;
  dof: number;
  residualSdPpm: number;
  /** Per-frequency offsets at x = 0 (ppm). */
  offsets: { frequencyHz: number; offsetPpm: number }[];
}

export interface DriftAnalysis {
  frequencies: FrequencyDrift[];
  steps: StepFinding[];
  /** Start of the current segment (years), the earliest history the fits use. */
  segmentStartYears: number | null;
  currentSegment: number;
  pooled: PooledDrift | null;
}

/**
 * Splits a meter's checks into segments and fits each check frequency over the newest one.
 * Each check's as-found point is first compared with the prediction from its segment (step
 * test); an adjusted check then starts a new segment at its as-left points, a flagged step starts
 * one at its as-found points, otherwise the as-found points join the segment. Checks must be in
 * time order.
 */
export function analyseDrift(
  checks: readonly HistoryCheck[],
  scale: FitScale = 'residual-or-stated',
): DriftAnalysis {
  for (let i = 1; i < checks.length; i++)
    if ((checks[i] as HistoryCheck).tYears < (checks[i - 1] as HistoryCheck).tYears)
      throw new Error('checks must be in time order');
  const series = new Map<number, SeriesObservation[]>();
  const tolerance = new Map<number, number>();
  let segment = 0;
  let segmentStart: number | null = null;
  const steps: StepFinding[] = [];
  // The current segment at each frequency as its step tests read it: the points to fit, in order,
  // and their distinct times (emptied when a segment starts). Kept as they grow rather than
  // filtered out of the whole series for every check.
  const current = new Map<number, { points: FitPoint[]; times: Set<number> }>();
  const newSegment = () => {
    segment += 1;
    current.clear();
  };
  const add = (p: HistoryPoint, t: number) => {
    const list = series.get(p.frequencyHz) ?? [];
    list.push({ tYears: t, phase: p.phase, errorPpm: p.errorPpm, uPpm: p.uPpm, segment });
    series.set(p.frequencyHz, list);
    let now = current.get(p.frequencyHz);
    if (!now) {
      now = { points: [], times: new Set() };
      current.set(p.frequencyHz, now);
    }
    now.points.push({ x: t, y: p.errorPpm, u: p.uPpm });
    now.times.add(t);
    tolerance.set(p.frequencyHz, p.tolerancePpm);
  };

  checks.forEach((c, index) => {
    const found = c.points.filter((p) => p.phase === 'as-found');
    const tests: StepTest[] = [];
    for (const p of found) {
      const prior = current.get(p.frequencyHz);
      if (prior && prior.points.length >= STEP_MIN_POINTS && prior.times.size >= 2) {
        const fit = fitLine(prior.points, scale);
        const pr = predict(fit, c.tYears, STEP_COVERAGE, p.uPpm);
        tests.push({
          frequencyHz: p.frequencyHz,
          observedPpm: p.errorPpm,
          predictedPpm: pr.value,
          limitPpm: pr.halfWidth,
          basis: 'prediction',
          flagged: Math.abs(p.errorPpm - pr.value) > pr.halfWidth,
        });
      }
    }
    const flaggedCount = tests.filter((t) => t.flagged).length;
    const isStep =
      tests.length > 0 && flaggedCount >= Math.max(1, Math.ceil(STEP_MIN_FRACTION * tests.length));
    if (tests.length > 0) steps.push({ checkIndex: index, tYears: c.tYears, tests, flaggedCount, isStep });

    if (index === 0) segmentStart = c.tYears;
    if (c.adjusted) {
      // The as-found points close the old segment; the as-left points open the new one.
      for (const p of found) add(p, c.tYears);
      newSegment();
      segmentStart = c.tYears;
      for (const p of c.points.filter((q) => q.phase === 'as-left')) add(p, c.tYears);
    } else {
      if (isStep && index > 0) {
        newSegment();
        segmentStart = c.tYears;
      }
      for (const p of found) add(p, c.tYears);
    }
  });

  const frequencies: FrequencyDrift[] = [...series.keys()]
    .sort((a, b) => a - b)
    .map((f) => {
      const obs = series.get(f) ?? [];
      const current = obs.filter((o) => o.segment === segment);
      const distinct = new Set(current.map((o) => o.tYears)).size;
      const fit =
        current.length >= 3 && distinct >= 2
          ? fitLine(
              current.map((o) => ({ x: o.tYears, y: o.errorPpm, u: o.uPpm })),
              scale,
            )
          : null;
      const newest = obs[obs.length - 1];
      return {
        frequencyHz: f,
        tolerancePpm: tolerance.get(f) ?? NaN,
        observations: obs,
        fit,
        uNewPpm: newest ? newest.uPpm : NaN,
      };
    });
  return {
    frequencies,
    steps,
    segmentStartYears: checks.length ? segmentStart : null,
    currentSegment: segment,
    pooled: pooledDrift(
      frequencies.map((f) => ({
        frequencyHz: f.frequencyHz,
        points: f.observations
          .filter((o) => o.segment === segment)
          .map((o) => ({ x: o.tYears, y: o.errorPpm, u: o.uPpm })),
      })),
      scale,
    ),
  };
}

/**
 * Pooled model across the band: error_ij = offset_j + drift * t_i, one drift (ppm per year)
 * common to every check frequency j, each frequency with its own offset (its graduation error).
 * Weighted least squares with the frequencies' centred sums; dof = N - J - 1.
 */
export function pooledDrift(
  groups: readonly { frequencyHz: number; points: readonly FitPoint[] }[],
  scale: FitScale = 'residual-or-stated',
): PooledDrift | null {
  const used = groups.filter((g) => g.points.length >= 2);
  const n = used.reduce((s, g) => s + g.points.length, 0);
  const dof = n - used.length - 1;
  // Stryker disable next-line ConditionalExpression,LogicalOperator: with no group n = 0 and dof = -1 already return null
  if (used.length === 0 || dof < 1) return null;
  const weightOf = (p: FitPoint) => (p.u !== undefined && p.u > 0 ? 1 / (p.u * p.u) : 1);
  const weighted = used.every((g) => g.points.every((p) => p.u !== undefined && p.u > 0));
  let sxx = 0;
  let sxy = 0;
  const centres = used.map((g) => {
    let sw = 0;
    let swx = 0;
    let swy = 0;
    for (const p of g.points) {
      const w = weightOf(p);
      sw += w;
      swx += w * p.x;
      swy += w * p.y;
    }
    const xm = swx / sw;
    const ym = swy / sw;
    for (const p of g.points) {
      const w = weightOf(p);
      sxx += w * (p.x - xm) ** 2;
      sxy += w * (p.x - xm) * (p.y - ym);
    }
    return { xm, ym };
  });
  if (!(sxx > 0)) return null;
  const drift = sxy / sxx;
  let chi2 = 0;
  let ssr = 0;
  const offsets = used.map((g, j) => {
    const c = centres[j] as { xm: number; ym: number };
    const offset = c.ym - drift * c.xm;
    for (const p of g.points) {
      const r = p.y - (offset + drift * p.x);
      ssr += r * r;
      chi2 += weightOf(p) * r * r;
    }
    return { frequencyHz: g.frequencyHz, offsetPpm: offset };
  });
  const s2 = chi2 / dof;
  const unitVariance = scale === 'residual-or-stated' && weighted ? Math.max(s2, 1) : s2;
  return {
    driftPpmPerYear: drift,
    uDriftPpmPerYear: Math.sqrt(unitVariance / sxx),
    n,
    frequencies: used.length,
    dof,
    residualSdPpm: Math.sqrt(ssr / dof),
    offsets,
  };
}

// ---------------------------------------------------------------------------------------------
// Health of the resonance: dip depth, loaded Q, spurious responses.

/** The dip has faded when the fitted depth fell by at least this fraction since the first check
 * of the history (the lab's choice; common practice, no published source). */
export const DIP_FADE_FRACTION = 0.3;
/** Loaded Q has fallen when the newest is below (1 - this) times the first (the lab's choice). */
export const Q_FALL_FRACTION = 0.2;

export interface HealthCheck {
  tYears: number;
  /** Dip depths of the check's as-found points, dB (may be empty). */
  dipDepthsDb: number[];
  /** Loaded Q from fitted sweeps, where recorded. */
  loadedQ: number[];
  /** Number of extra resonances found in the check's sweeps, where recorded. */
  spuriousCount?: number;
}

export interface HealthAnalysis {
  /** Shallowest dip of each check that recorded one. */
  dip: { tYears: number; minDb: number }[];
  dipFit: LineFit | null;
  /** When the fitted depth reaches the meter's minimum (years), if it falls. */
  dipReachesMinimumYears: number | null;
  /** Fraction by which the depth fell from the first to the newest check (fitted if possible). */
  dipFallFraction: number | null;
  newestDipDb: number | null;
  q: { tYears: number; meanQ: number }[];
  qFallFraction: number | null;
  belowMinimum: boolean;
  fading: boolean;
  qFalling: boolean;
  spurious: boolean;
}

export function analyseHealth(checks: readonly HealthCheck[], minDipDb: number): HealthAnalysis {
  const dip = checks
    .filter((c) => c.dipDepthsDb.length > 0)
    .map((c) => ({ tYears: c.tYears, minDb: Math.min(...c.dipDepthsDb) }));
  const distinct = new Set(dip.map((d) => d.tYears)).size;
  const dipFit =
    dip.length >= 3 && distinct >= 2 ? fitLine(dip.map((d) => ({ x: d.tYears, y: d.minDb }))) : null;
  const first = dip[0];
  const newest = dip[dip.length - 1];
  let dipFallFraction: number | null = null;
  if (first && newest && dip.length >= 2) {
    const a = dipFit ? dipFit.intercept + dipFit.slope * first.tYears : first.minDb;
    const b = dipFit ? dipFit.intercept + dipFit.slope * newest.tYears : newest.minDb;
    dipFallFraction = a > 0 ? (a - b) / a : null;
  }
  const dipReachesMinimumYears =
    dipFit && dipFit.slope < 0 ? (minDipDb - dipFit.intercept) / dipFit.slope : null;
  const q = checks
    .filter((c) => c.loadedQ.length > 0)
    .map((c) => ({ tYears: c.tYears, meanQ: c.loadedQ.reduce((s, v) => s + v, 0) / c.loadedQ.length }));
  const q0 = q[0];
  const qn = q[q.length - 1];
  const qFallFraction = q0 && qn && q.length >= 2 ? (q0.meanQ - qn.meanQ) / q0.meanQ : null;
  const newestCheck = checks[checks.length - 1];
  return {
    dip,
    dipFit,
    dipReachesMinimumYears,
    dipFallFraction,
    newestDipDb: newest ? newest.minDb : null,
    q,
    qFallFraction,
    belowMinimum: newest !== undefined && newest.minDb < minDipDb,
    fading: dipFallFraction !== null && dipFallFraction >= DIP_FADE_FRACTION,
    qFalling: qFallFraction !== null && qFallFraction >= Q_FALL_FRACTION,
    spurious: (newestCheck?.spuriousCount ?? 0) > 0,
  };
}
