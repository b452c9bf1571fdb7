// Statements of conformity of a meter's error against its stated accuracy, a two-sided symmetric
// tolerance |E| <= T, under a documented decision rule, with the probability of conformity.
// Sources: ILAC-G8:09/2019 section 4.2 (4.2.1 simple acceptance, w = 0; 4.2.2 binary with guard
// band, AL = TL - w; 4.2.3 non-binary pass / conditional pass / conditional fail / fail with w = U);
// JCGM 106:2012 section 7 (conformance probability for a normal PDF, p_c = Phi((T_U - y)/u) -
// Phi((T_L - y)/u)); test uncertainty ratio T/U (common practice).
//
// Boundaries: a result equal to a limit has not passed beyond it, so each limit belongs to the
// more favourable verdict: pass if |E| <= AL; non-binary: pass |E| <= T - U, conditional pass
// T - U < |E| <= T, conditional fail T < |E| <= T + U, fail |E| > T + U. ILAC-G8 4.2.3 writes the
// zones as closed intervals that share their ends and leaves the exact boundary to the rule the
// lab documents; this is that documentation.

import type { Decision, DecisionRule, MeterSpec, Verdict } from './model';
import { normalCdf } from './distributions';

/** Tolerance half-width in Hz at a reading: relative term plus absolute term. "0.1 % of reading"
 * is accuracyRelPpm = 1000 (common practice for cavity meters). */
export function toleranceHz(
  spec: Pick<MeterSpec, 'accuracyRelPpm' | 'accuracyAbsHz'>,
  readingHz: number,
): number {
  // ppm * Hz / 1e6 rather than ppm * 1e-6 * Hz: 1e-6 is not exact in binary, and exact limits
  // matter for results that sit on them.
  return (spec.accuracyRelPpm * Math.abs(readingHz)) / 1e6 + spec.accuracyAbsHz;
}

/** Probability that a normally distributed measurand (expectation y, standard deviation u) lies
 * in [lower, upper] (JCGM 106:2012 7.4). u = 0 gives 1 inside (ends included), 0 outside. */
export function probabilityInInterval(
  lower: number,
  upper: number,
  estimate: number,
  standardUncertainty: number,
): number {
  if (!(standardUncertainty > 0)) return estimate >= lower && estimate <= upper ? 1 : 0;
  return (
    normalCdf((upper - estimate) / standardUncertainty) - normalCdf((lower - estimate) / standardUncertainty)
  );
}

/** p_c for |E| <= T: Phi((T - E)/u) - Phi((-T - E)/u). */
export function probabilityOfConformity(
  errorHz: number,
  toleranceHalfWidthHz: number,
  combinedHz: number,
): number {
  return probabilityInInterval(-toleranceHalfWidthHz, toleranceHalfWidthHz, errorHz, combinedHz);
}

/** Guard band w, Hz, for a rule. */
export function guardBandHz(rule: DecisionRule, expandedHz: number, readingHz: number): number {
  switch (rule.kind) {
    case 'simple':
      return 0;
    case 'guarded':
      return rule.multipleOfU * expandedHz;
    case 'guarded-fixed':
      return (rule.guardBandPpm * Math.abs(readingHz)) / 1e6;
    case 'non-binary':
      return expandedHz;
  }
}

export interface DecisionInputs {
  errorHz: number;
  toleranceHz: number;
  combinedHz: number;
  expandedHz: number;
  /** The reading a fixed guard band in ppm is taken of. */
  readingHz: number;
}

/** Applies the rule and returns the decision with p_c and the TUR. */
export function decide(rule: DecisionRule, inputs: DecisionInputs): Decision {
  const { errorHz, combinedHz, expandedHz, readingHz } = inputs;
  const t = inputs.toleranceHz;
  // Every own field, in order, as Object.entries gives them, without making the pairs (this runs
  // for every point of a bulk import).
  for (const name in inputs) {
    // Stryker disable next-line all: inputs are plain objects; an inherited key never reaches here
    if (!Object.prototype.hasOwnProperty.call(inputs, name)) continue;
    const v = (inputs as unknown as Record<string, unknown>)[name];
    if (!Number.isFinite(v)) throw new Error(`decision: ${name} must be a finite number (got ${String(v)})`);
  }
  if (t < 0 || combinedHz < 0 || expandedHz < 0)
    throw new Error('decision: tolerance and uncertainties must not be negative');
  if (rule.kind === 'guarded' && !(rule.multipleOfU >= 0))
    throw new Error('decision: guard band multiple of U must not be negative');
  if (rule.kind === 'guarded-fixed' && !(rule.guardBandPpm >= 0))
    throw new Error('decision: fixed guard band must not be negative');
  const w = guardBandHz(rule, expandedHz, readingHz);
  const magnitude = Math.abs(errorHz);
  const acceptanceLimitHz = t - w;
  let verdict: Verdict;
  if (rule.kind === 'non-binary') {
    if (magnitude <= t - w) verdict = 'pass';
    else if (magnitude <= t) verdict = 'conditional-pass';
    else if (magnitude <= t + w) verdict = 'conditional-fail';
    else verdict = 'fail';
  } else {
    verdict = magnitude <= acceptanceLimitHz ? 'pass' : 'fail';
  }
  return {
    rule,
    verdict,
    acceptanceLimitHz,
    toleranceHz: t,
    guardBandHz: w,
    probabilityOfConformity: probabilityOfConformity(errorHz, t, combinedHz),
    tur: expandedHz > 0 ? t / expandedHz : Infinity,
  };
}
