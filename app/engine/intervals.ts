// Suggested recalibration intervals from evidence, each with a plain-language rationale naming
// its method. Intervals are whole months inside the lab's policy bounds (rounded down: a
// shorter interval errs on the safe side).
//
// Sources:
// - Variables-data method: the probability of conformity of a normal distribution, JCGM 106:2012
//   section 7, taken with the prediction's mean and standard deviation from drift.ts
//   (e-Handbook 4.5.1.2); the interval is the longest whose end still meets the reliability target.
// - Attributes method: NCSL International RP-1, "Establishment and Adjustment of Calibration
//   Intervals": exponential reliability model R(t) = exp(-lambda t), maximum likelihood on
//   in/out-of-tolerance results at their resubmission intervals, interval = -ln(R*) / lambda, and
//   a binomial test of the observed reliability against the target before any change.
// - Simple staircase: ILAC-G24:2022 / OIML D 10:2022, 6.2 "Method 1: Automatic adjustment or
//   'staircase' (calendar-time)". The step sizes are this lab's choice (common practice).

import binomialCdf from '@stdlib/stats-base-dists-binomial-cdf';
import { probabilityInInterval } from './conformity';
import { predict, type LineFit } from './drift';

export type IntervalMethod = 'variables' | 'attributes' | 'staircase';

export const METHOD_NAMES: Record<IntervalMethod, string> = {
  variables: 'variables-data method (drift prediction and JCGM 106 probability of conformity)',
  attributes: 'attributes method (NCSL International RP-1 exponential reliability model)',
  staircase: 'simple staircase (ILAC-G24 / OIML D 10 method 1, automatic adjustment)',
};

export interface IntervalPolicy {
  minMonths: number;
  maxMonths: number;
}

export interface IntervalSuggestion {
  method: IntervalMethod;
  methodName: string;
  /** Whole months inside the policy bounds. */
  months: number;
  /** What the method gave before the policy bounds (months, may be fractional or Infinity). */
  unboundedMonths: number;
  boundedBy: 'minimum' | 'maximum' | null;
  currentMonths: number;
  change: 'longer' | 'shorter' | 'same';
  rationale: string;
  /** The rationale without its opening verdict: why the method gives what it gives. */
  reason: string;
}

/** Whole months (rounded down) clamped to [min, max]. */
export function applyPolicy(
  months: number,
  policy: IntervalPolicy,
): { months: number; boundedBy: 'minimum' | 'maximum' | null } {
  if (!(policy.minMonths >= 1) || !(policy.maxMonths >= policy.minMonths))
    throw new Error('interval policy: need 1 <= minimum <= maximum');
  const whole = Number.isFinite(months) ? Math.floor(months + 1e-9) : Infinity;
  if (whole < policy.minMonths) return { months: policy.minMonths, boundedBy: 'minimum' };
  if (whole > policy.maxMonths) return { months: policy.maxMonths, boundedBy: 'maximum' };
  return { months: whole, boundedBy: null };
}

function finish(
  method: IntervalMethod,
  unboundedMonths: number,
  currentMonths: number,
  policy: IntervalPolicy,
  why: string,
): IntervalSuggestion {
  const b = applyPolicy(unboundedMonths, policy);
  const change = b.months > currentMonths ? 'longer' : b.months < currentMonths ? 'shorter' : 'same';
  const bound =
    b.boundedBy === 'minimum'
      ? ` This is below the lab's minimum, so the minimum of ${policy.minMonths} months applies.`
      : b.boundedBy === 'maximum'
        ? ` The lab's maximum of ${policy.maxMonths} months applies.`
        : '';
  const verdict =
    change === 'same'
      ? `Keep the present ${currentMonths}-month interval.`
      : `Suggested interval ${b.months} months (now ${currentMonths}).`;
  return {
    method,
    methodName: METHOD_NAMES[method],
    months: b.months,
    unboundedMonths,
    boundedBy: b.boundedBy,
    currentMonths,
    change,
    rationale: `${verdict} Method: ${METHOD_NAMES[method]}. ${why}${bound}`,
    reason: `${why}${bound}`,
  };
}

// ---------------------------------------------------------------------------------------------
// Variables-data method.

export interface VariablesFrequency {
  frequencyHz: number;
  fit: LineFit;
  tolerancePpm: number;
  /** Standard uncertainty of a future check's error at this frequency, ppm. */
  uNewPpm: number;
}

/** JCGM 106 probability that a future check finds the error inside +-T, with the prediction's
 * mean and standard deviation (sigma_p of e-Handbook 4.5.1.2). */
export function predictedConformity(f: VariablesFrequency, tYears: number): number {
  const p = predict(f.fit, tYears, 0.95, f.uNewPpm);
  return probabilityInInterval(-f.tolerancePpm, f.tolerancePpm, p.value, p.sdPrediction);
}

export interface VariablesResult {
  /** Longest whole number of months from the last check with p_c >= target at every frequency
   * and every month up to it; 0 when already below target at the last check. */
  months: number;
  limitingFrequencyHz: number | null;
  /** Lowest p_c over the frequencies at the end of that interval, and one month later. */
  conformityAtEnd: number;
  conformityAfter: number | null;
}

export function variablesInterval(
  frequencies: readonly VariablesFrequency[],
  lastCheckYears: number,
  reliabilityTarget: number,
  maxMonths: number,
): VariablesResult {
  if (frequencies.length === 0) throw new Error('variables-data method: no fitted frequency');
  const worst = (m: number) => {
    let low = Infinity;
    let at: number | null = null;
    for (const f of frequencies) {
      const pc = predictedConformity(f, lastCheckYears + m / 12);
      // Stryker disable next-line EqualityOperator: on a tie either frequency limits the interval equally
      if (pc < low) {
        low = pc;
        at = f.frequencyHz;
      }
    }
    return { low, at };
  };
  let months = 0;
  let end = worst(0);
  if (end.low < reliabilityTarget)
    return { months: 0, limitingFrequencyHz: end.at, conformityAtEnd: end.low, conformityAfter: null };
  for (let m = 1; m <= maxMonths; m++) {
    const w = worst(m);
    if (w.low < reliabilityTarget)
      return { months, limitingFrequencyHz: w.at, conformityAtEnd: end.low, conformityAfter: w.low };
    months = m;
    end = w;
  }
  return { months, limitingFrequencyHz: end.at, conformityAtEnd: end.low, conformityAfter: null };
}

export function suggestByVariables(
  frequencies: readonly VariablesFrequency[],
  lastCheckYears: number,
  reliabilityTarget: number,
  currentMonths: number,
  policy: IntervalPolicy,
  describeFrequency: (hz: number) => string,
): IntervalSuggestion & { detail: VariablesResult } {
  const r = variablesInterval(frequencies, lastCheckYears, reliabilityTarget, policy.maxMonths + 1);
  const pct = (x: number) => `${(x * 100).toFixed(1)} %`;
  const target = pct(reliabilityTarget);
  const limiting = r.limitingFrequencyHz !== null ? describeFrequency(r.limitingFrequencyHz) : 'none';
  const why =
    r.months === 0
      ? `The drift fitted at each check frequency predicts a probability of conformity below the target of ${target} already at the last check (${pct(r.conformityAtEnd)} at ${limiting}).`
      : r.conformityAfter === null
        ? `The drift fitted at each check frequency keeps the predicted probability of conformity at or above the target of ${target} for at least ${r.months} months (lowest ${pct(r.conformityAtEnd)}, at ${limiting}).`
        : `The drift fitted at each check frequency keeps the predicted probability of conformity at or above the target of ${target} for ${r.months} months; a month later it falls to ${pct(r.conformityAfter)} at ${limiting}.`;
  const unbounded = r.conformityAfter === null && r.months > policy.maxMonths ? Infinity : r.months;
  return { ...finish('variables', unbounded, currentMonths, policy, why), detail: r };
}

// ---------------------------------------------------------------------------------------------
// Attributes method (NCSL International RP-1).

export interface AttributeRecord {
  /** Time since the previous calibration, years (or any unit, used consistently). */
  interval: number;
  inTolerance: boolean;
}

export interface ExponentialFit {
  /** Failure rate per unit of `interval`; 0 when nothing was found out of tolerance, Infinity
   * when nothing was found in tolerance. */
  lambda: number;
  /** Standard uncertainty from the observed information (null when lambda is 0 or Infinity). */
  uLambda: number | null;
  n: number;
  inTolerance: number;
  logLikelihood: number;
}

/** Log-likelihood of the exponential reliability model for in/out-of-tolerance results. */
export function exponentialLogLikelihood(records: readonly AttributeRecord[], lambda: number): number {
  let ll = 0;
  for (const r of records) {
    if (r.inTolerance) ll += -lambda * r.interval;
    else ll += Math.log(-Math.expm1(-lambda * r.interval));
  }
  return ll;
}

/** Maximum-likelihood lambda of R(t) = exp(-lambda t). The score
 * U(lambda) = -sum_in t + sum_out t e^{-lambda t} / (1 - e^{-lambda t}) falls monotonically from
 * +Infinity to -sum_in t, so its root is bracketed and found by bisection on log(lambda). */
export function fitExponentialReliability(records: readonly AttributeRecord[]): ExponentialFit {
  for (const r of records)
    if (!(r.interval > 0) || !Number.isFinite(r.interval))
      throw new Error(`attributes method: every interval must be positive (got ${r.interval})`);
  const n = records.length;
  const inTol = records.filter((r) => r.inTolerance).length;
  if (n === 0) throw new Error('attributes method: no results');
  if (inTol === n) return { lambda: 0, uLambda: null, n, inTolerance: inTol, logLikelihood: 0 };
  if (inTol === 0) return { lambda: Infinity, uLambda: null, n, inTolerance: 0, logLikelihood: 0 };
  const score = (lambda: number) => {
    let u = 0;
    for (const r of records) {
      if (r.inTolerance) u -= r.interval;
      else u += r.interval / Math.expm1(lambda * r.interval);
    }
    return u;
  };
  let lo = -60;
  let hi = 60;
  for (let i = 0; i < 200; i++) {
    const mid = (lo + hi) / 2;
    if (score(Math.exp(mid)) > 0) lo = mid;
    else hi = mid;
  }
  const lambda = Math.exp((lo + hi) / 2);
  let info = 0;
  for (const r of records) {
    if (r.inTolerance) continue;
    const e = Math.exp(-lambda * r.interval);
    info += (r.interval * r.interval * e) / (1 - e) ** 2;
  }
  return {
    lambda,
    uLambda: info > 0 ? 1 / Math.sqrt(info) : null,
    n,
    inTolerance: inTol,
    logLikelihood: exponentialLogLikelihood(records, lambda),
  };
}

/** Interval at which R(t) = exp(-lambda t) equals the target: -ln(R*) / lambda. */
export function exponentialInterval(lambda: number, reliabilityTarget: number): number {
  if (!(reliabilityTarget > 0 && reliabilityTarget < 1))
    throw new Error('reliability target must lie between 0 and 1');
  if (lambda === 0) return Infinity;
  return -Math.log(reliabilityTarget) / lambda;
}

export interface BinomialTest {
  n: number;
  successes: number;
  observed: number;
  target: number;
  /** Two-sided p-value (twice the smaller tail, at most 1). */
  pValue: number;
  significant: boolean;
  alpha: number;
}

/** Is the observed in-tolerance fraction x/n consistent with the target reliability? */
export function binomialTest(successes: number, n: number, target: number, alpha = 0.05): BinomialTest {
  if (!Number.isInteger(n) || n < 1 || !Number.isInteger(successes) || successes < 0 || successes > n)
    throw new Error('binomial test: need whole numbers 0 <= successes <= n, n >= 1');
  const lower = binomialCdf(successes, n, target);
  const upper = successes === 0 ? 1 : 1 - binomialCdf(successes - 1, n, target);
  const pValue = Math.min(1, 2 * Math.min(lower, upper));
  return { n, successes, observed: successes / n, target, pValue, significant: pValue < alpha, alpha };
}

/** Results at intervals within this fraction of the current one count as "at the current
 * interval" for the binomial test (the lab's choice). */
export const TEST_WINDOW_FRACTION = 0.25;

export function suggestByAttributes(
  records: readonly AttributeRecord[],
  reliabilityTarget: number,
  currentMonths: number,
  policy: IntervalPolicy,
  groupWords: string,
): IntervalSuggestion & { fit: ExponentialFit; test: BinomialTest | null } {
  const fit = fitExponentialReliability(records.map((r) => ({ ...r, interval: r.interval })));
  const currentYears = currentMonths / 12;
  const near = records.filter(
    (r) => Math.abs(r.interval - currentYears) <= TEST_WINDOW_FRACTION * currentYears,
  );
  const test =
    near.length > 0
      ? binomialTest(near.filter((r) => r.inTolerance).length, near.length, reliabilityTarget)
      : null;
  const target = `${(reliabilityTarget * 100).toFixed(1)} %`;
  const fitted = exponentialInterval(fit.lambda, reliabilityTarget) * 12;
  const fitWords =
    fit.lambda === 0
      ? `none of ${fit.n} as-found results of ${groupWords} was out of tolerance, so the exponential model sets no limit`
      : `${fit.n - fit.inTolerance} of ${fit.n} as-found results of ${groupWords} were out of tolerance; the fitted failure rate is ${fit.lambda.toFixed(4)} per year, which reaches the target of ${target} at ${fitted.toFixed(1)} months`;
  if (test && !test.significant) {
    const why = `${capital(fitWords)}. At about the present interval ${test.successes} of ${test.n} were in tolerance (${(test.observed * 100).toFixed(1)} %); the binomial test does not show this differs from the target (p = ${test.pValue.toFixed(3)}), so the interval is not changed.`;
    return { ...finish('attributes', currentMonths, currentMonths, policy, why), fit, test };
  }
  const testWords = test
    ? ` At about the present interval ${test.successes} of ${test.n} were in tolerance (${(test.observed * 100).toFixed(1)} %), which differs from the target (binomial test p = ${test.pValue.toFixed(3)}).`
    : ' No results at about the present interval to test; the fitted model decides.';
  return {
    ...finish('attributes', fitted, currentMonths, policy, `${capital(fitWords)}.${testWords}`),
    fit,
    test,
  };
}

// ---------------------------------------------------------------------------------------------
// Simple staircase (ILAC-G24 / OIML D 10 method 1).

/** Step sizes of the staircase (the lab's choice; common practice, no published values). */
export const STAIRCASE = {
  /** Found in tolerance and using no more than this fraction of it: lengthen. */
  comfortableFraction: 0.5,
  lengthenFactor: 1.25,
  /** Found out of tolerance: shorten. */
  shortenFactor: 0.5,
} as const;

export function suggestByStaircase(
  last: { inTolerance: boolean; worstUsedFraction: number | null } | null,
  currentMonths: number,
  policy: IntervalPolicy,
  reason: string,
): IntervalSuggestion {
  let months = currentMonths;
  let why: string;
  if (!last) {
    why = `${reason} No as-found result yet: the present interval stands until the first check.`;
  } else if (!last.inTolerance) {
    months = currentMonths * STAIRCASE.shortenFactor;
    why = `${reason} The last check found the meter out of tolerance, so the interval is shortened to ${STAIRCASE.shortenFactor * 100} % of the present one.`;
  } else if (last.worstUsedFraction !== null && last.worstUsedFraction <= STAIRCASE.comfortableFraction) {
    months = currentMonths * STAIRCASE.lengthenFactor;
    why = `${reason} The last check found the meter in tolerance using at most ${(last.worstUsedFraction * 100).toFixed(0)} % of it, so the interval is lengthened by ${((STAIRCASE.lengthenFactor - 1) * 100).toFixed(0)} %.`;
  } else {
    why = `${reason} The last check found the meter in tolerance but using ${last.worstUsedFraction === null ? 'an unknown part' : `${(last.worstUsedFraction * 100).toFixed(0)} %`} of it, so the interval is kept.`;
  }
  return finish('staircase', months, currentMonths, policy, why);
}

// ---------------------------------------------------------------------------------------------
// Alert zone (the lab's policy, common practice).

/** A meter whose newest as-found error uses at least this fraction of its tolerance, and that
 * was left unadjusted, is in the alert zone: its margin covers only the error of the model (a
 * faster drift, a step), so the interval is not left as the model alone would set it. */
export const ALERT_FRACTION = 0.8;

/**
 * Applies the alert zone to a suggestion: when the newest as-found error used at least
 * ALERT_FRACTION of the tolerance and the meter was not adjusted, the interval becomes the
 * staircase's shortened step (STAIRCASE.shortenFactor of the present interval) unless the method
 * already gave less. The method's own result stays in the rationale.
 */
export function applyAlertZone(
  s: IntervalSuggestion,
  newest: { worstUsedFraction: number | null; adjusted: boolean } | null,
  policy: IntervalPolicy,
): IntervalSuggestion & { alert: boolean } {
  const used = newest?.worstUsedFraction ?? null;
  if (!newest || newest.adjusted || used === null || used < ALERT_FRACTION) return { ...s, alert: false };
  const shortened = applyPolicy(s.currentMonths * STAIRCASE.shortenFactor, policy);
  if (s.months <= shortened.months) return { ...s, alert: true };
  const found =
    used > 1
      ? `found the meter out of tolerance (${(used * 100).toFixed(0)} % of its tolerance)`
      : `found the meter using ${(used * 100).toFixed(0)} % of its tolerance, at or above the lab's alert level of ${(ALERT_FRACTION * 100).toFixed(0)} %,`;
  const why = `The ${s.methodName} alone gives ${s.months} months: ${s.reason} But the last check ${found} and it was not adjusted: adjust it, or shorten the interval to ${(STAIRCASE.shortenFactor * 100).toFixed(0)} % of the present one (the ILAC-G24 / OIML D 10 method 1 step) so that a check comes before what is left of the tolerance is used up.`;
  const change =
    shortened.months > s.currentMonths ? 'longer' : shortened.months < s.currentMonths ? 'shorter' : 'same';
  return {
    ...s,
    months: shortened.months,
    boundedBy: shortened.boundedBy,
    change,
    rationale: `Suggested interval ${shortened.months} months (now ${s.currentMonths}). ${why}`,
    reason: why,
    alert: true,
  };
}

function capital(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}
