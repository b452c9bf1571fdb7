// Re-judging a stored point when its reference turns out to have been off: the standard's
// as-found deviation (from its next certificate, or asked as a what-if) applied to the point's
// reference frequency, its uncertainty added to the budget as a line of its own, and the
// decision rule the point was judged under applied again.
// Sources: VIM (JCGM 200:2012) 2.16, measurement error = measured value minus reference value;
// JCGM 100:2008 (GUM) 5.1.2 eq. (10) and G.4.1 eq. (G.2b) for the budget (see budget.ts);
// ILAC-G8:09/2019 4.2 for the decision (see conformity.ts); ISO/IEC 17025:2017 7.10 for why.
//
// Model: the standard indicated f_ref while the true frequency was f_ref - d (d = its as-found
// deviation, indicated minus true). The meter's error against the true value is then
//   E' = f_corr - (f_ref - d) = E + d,
// with d = d_ppm * f_ref / 1e6 for a relative deviation, or d_Hz as given. The deviation's
// standard uncertainty u_d enters with sensitivity +1 (dE'/dd = 1) as a new, uncorrelated line:
//   u_c' = sqrt(u_c^2 + u_d^2), nu_eff' from all the lines again (Welch-Satterthwaite),
// k' from nu_eff', U' = k' u_c'. The tolerance is the stored one (it depends on the corrected
// indication, which the deviation does not change), and the rule is the stored rule.

import type { Budget, Contribution, Decision, PointResult, Verdict } from './model';
import { combine, makeContribution } from './budget';
import { decide } from './conformity';

/** The standard's as-found deviation at the point: indicated minus true. */
export interface ReferenceDeviation {
  /** Relative ('ppm', of the point's reference frequency) or absolute ('Hz'). */
  unit: 'ppm' | 'Hz';
  value: number;
  /** Standard uncertainty of the deviation, in the same unit (a certificate's U divided by k). */
  standardUncertainty: number;
  /** Degrees of freedom of that uncertainty; Infinity (the default) when taken as exactly known. */
  dof?: number;
}

/** The part of a stored point result that re-judging reads. */
export type StoredPointResult = Pick<PointResult, 'correctedHz' | 'errorHz' | 'budget' | 'decision'>;

export interface RejudgedPoint {
  /** The deviation applied at this point, Hz (d). */
  deviationHz: number;
  errorHz: number;
  errorPpm: number;
  budget: Budget;
  expandedPpm: number;
  decision: Decision;
  verdictBefore: Verdict;
  verdict: Verdict;
  verdictChanged: boolean;
}

function requireFinite(value: unknown, what: string): asserts value is number {
  if (typeof value !== 'number' || !Number.isFinite(value))
    throw new Error(`${what} must be a finite number (got ${String(value)})`);
}

/** The deviation in Hz at a reference frequency, and its standard uncertainty in Hz. */
export function deviationAtHz(
  deviation: ReferenceDeviation,
  referenceHz: number,
): { deviationHz: number; uncertaintyHz: number } {
  if (deviation.unit !== 'ppm' && deviation.unit !== 'Hz')
    throw new Error(`deviation.unit must be 'ppm' or 'Hz' (got ${String(deviation.unit)})`);
  requireFinite(deviation.value, 'deviation.value');
  requireFinite(deviation.standardUncertainty, 'deviation.standardUncertainty');
  if (deviation.standardUncertainty < 0)
    throw new Error('deviation.standardUncertainty must not be negative');
  requireFinite(referenceHz, 'referenceHz');
  if (!(referenceHz > 0)) throw new Error(`referenceHz must be positive (got ${referenceHz})`);
  if (deviation.unit === 'Hz')
    return { deviationHz: deviation.value, uncertaintyHz: deviation.standardUncertainty };
  // ppm * Hz / 1e6 rather than ppm * 1e-6 * Hz, as toleranceHz does (1e-6 is not exact in binary).
  return {
    deviationHz: (deviation.value * referenceHz) / 1e6,
    uncertaintyHz: (deviation.standardUncertainty * referenceHz) / 1e6,
  };
}

/** The budget line of a deviation's uncertainty, Hz, sensitivity +1. */
export function deviationLine(uncertaintyHz: number, dof = Infinity): Contribution {
  return makeContribution({
    key: 'reference-deviation',
    label: 'Reference as-found deviation (later certificate)',
    type: 'B',
    distribution: 'normal',
    unit: 'Hz',
    standardUncertainty: uncertaintyHz,
    sensitivity: 1,
    dof,
  });
}

/** Re-judges one stored point with its reference off by `deviation`. Throws Error on input it
 * cannot judge (a stored result without a budget or decision, a deviation that is not finite). */
export function rejudgePoint(
  stored: StoredPointResult,
  referenceHz: number,
  deviation: ReferenceDeviation,
): RejudgedPoint {
  const { budget, decision } = stored;
  if (!budget || !Array.isArray(budget.contributions) || !decision || !decision.rule)
    throw new Error('stored result: a budget and a decision are needed to judge it again');
  requireFinite(stored.errorHz, 'stored result errorHz');
  requireFinite(stored.correctedHz, 'stored result correctedHz');
  const { deviationHz, uncertaintyHz } = deviationAtHz(deviation, referenceHz);
  const dof = deviation.dof ?? Infinity;
  if (!(dof > 0)) throw new Error(`deviation.dof must be positive (got ${String(dof)})`);
  const errorHz = stored.errorHz + deviationHz;
  const rejudged = combine(
    [...budget.contributions, deviationLine(uncertaintyHz, dof)],
    budget.coverageProbability,
  );
  const newDecision = decide(decision.rule, {
    errorHz,
    toleranceHz: decision.toleranceHz,
    combinedHz: rejudged.combinedHz,
    expandedHz: rejudged.expandedHz,
    readingHz: stored.correctedHz,
  });
  return {
    deviationHz,
    errorHz,
    errorPpm: (errorHz / referenceHz) * 1e6,
    budget: rejudged,
    expandedPpm: (rejudged.expandedHz / referenceHz) * 1e6,
    decision: newDecision,
    verdictBefore: decision.verdict,
    verdict: newDecision.verdict,
    verdictChanged: newDecision.verdict !== decision.verdict,
  };
}
