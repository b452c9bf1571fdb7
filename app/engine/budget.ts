// The uncertainty budget of one measurand: lines (contributions), their combination, the
// Welch-Satterthwaite effective degrees of freedom, the coverage factor and the expanded uncertainty.
// Source: JCGM 100:2008 (GUM): 4.2 (Type A: s/sqrt(n), nu = n - 1), 4.3.7 (rectangular: a/sqrt(3)),
// 4.3.3 (from a certificate: U/k), 5.1.2 eq. (10) (law of propagation, uncorrelated inputs),
// G.4.1 eq. (G.2b) (nu_eff), 6.2.1 (U = k u_c).

import type { Budget, Contribution, Distribution } from './model';
import { coverageFactor, DEFAULT_COVERAGE_PROBABILITY } from './distributions';

export type ContributionKey = Contribution['key'];

export interface ContributionInput {
  key: ContributionKey;
  label: string;
  type: 'A' | 'B';
  distribution: Distribution;
  unit: string;
  standardUncertainty: number;
  sensitivity: number;
  dof: number;
}

/** The message is put together only when it is needed: this runs for every budget line. */
function requireFinite(value: number, key: string, what: string): void {
  if (!Number.isFinite(value))
    throw new Error(`${key}: ${what} must be a finite number (got ${String(value)})`);
}

function checkLine(key: string, standardUncertainty: number, sensitivity: number, dof: number): void {
  requireFinite(standardUncertainty, key, 'standard uncertainty');
  requireFinite(sensitivity, key, 'sensitivity');
  if (standardUncertainty < 0) throw new Error(`${key}: standard uncertainty must not be negative`);
  if (Number.isNaN(dof) || dof <= 0)
    throw new Error(`${key}: degrees of freedom must be positive (got ${dof})`);
}

// The lines are written out key by key, in the order the spreads ({ ...input, contributionHz })
// gave them, for the shapes the engine passes: a spread over its dozen differently shaped lines
// fell to V8's slow generic path, about half the time of evaluating a point in a bulk import
// (issue 8). Any other shape still goes through the spread. The key order is part of the stored
// result's text, hence the care.
// Stryker disable all: speed-only shortcut; a line that fails this shape test takes the spread,
// which gives the same object (test/reference/budget-lines.test.ts checks the fields and their order).
const INPUT_KEYS = [
  'key',
  'label',
  'type',
  'distribution',
  'unit',
  'standardUncertainty',
  'sensitivity',
  'dof',
];
const IDENTITY_KEYS = ['key', 'label', 'unit', 'sensitivity'];

function hasKeys(o: object, keys: readonly string[]): boolean {
  let i = 0;
  for (const k in o) {
    if (!Object.prototype.hasOwnProperty.call(o, k) || k !== keys[i]) return false;
    i++;
  }
  return i === keys.length;
}
// Stryker restore all

/** A budget line with contributionHz = |c| u filled in. */
export function makeContribution(input: ContributionInput): Contribution {
  checkLine(input.key, input.standardUncertainty, input.sensitivity, input.dof);
  const contributionHz = Math.abs(input.sensitivity) * input.standardUncertainty;
  // Stryker disable next-line ConditionalExpression: always taking the spread gives the same object (speed-only shortcut)
  if (!hasKeys(input, INPUT_KEYS)) return { ...input, contributionHz };
  return {
    key: input.key,
    label: input.label,
    type: input.type,
    distribution: input.distribution,
    unit: input.unit,
    standardUncertainty: input.standardUncertainty,
    sensitivity: input.sensitivity,
    dof: input.dof,
    contributionHz,
  };
}

interface LineIdentity {
  key: ContributionKey;
  label: string;
  unit: string;
  sensitivity: number;
}

/** makeContribution({ ...line, type, distribution, standardUncertainty, dof }). */
function lineOf(
  line: LineIdentity,
  type: 'A' | 'B',
  distribution: Distribution,
  standardUncertainty: number,
  dof: number,
): Contribution {
  // Stryker disable next-line ConditionalExpression: always taking the spread gives the same object (speed-only shortcut)
  if (!hasKeys(line, IDENTITY_KEYS))
    return makeContribution({ ...line, type, distribution, standardUncertainty, dof });
  checkLine(line.key, standardUncertainty, line.sensitivity, dof);
  return {
    key: line.key,
    label: line.label,
    unit: line.unit,
    sensitivity: line.sensitivity,
    type,
    distribution,
    standardUncertainty,
    dof,
    contributionHz: Math.abs(line.sensitivity) * standardUncertainty,
  };
}

/** Type A from n observations with experimental standard deviation s: u = s/sqrt(n), nu = n - 1. */
export function typeA(line: LineIdentity, standardDeviation: number, count: number): Contribution {
  if (!Number.isInteger(count) || count < 2)
    throw new Error(`${line.key}: a Type A evaluation needs at least 2 observations (got ${count})`);
  return lineOf(line, 'A', 't', standardDeviation / Math.sqrt(count), count - 1);
}

/** Type B, rectangular of half-width a: u = a/sqrt(3), taken as exactly known (nu = Infinity). */
export function rectangular(line: LineIdentity, halfWidth: number): Contribution {
  requireFinite(halfWidth, line.key, 'half-width');
  return lineOf(line, 'B', 'rectangular', Math.abs(halfWidth) / Math.sqrt(3), Infinity);
}

/** Type B from a certificate's expanded uncertainty U with coverage factor k: u = U/k. */
export function normalFromCertificate(
  line: LineIdentity,
  expandedUncertainty: number,
  k: number,
  dof = Infinity,
): Contribution {
  requireFinite(expandedUncertainty, line.key, 'expanded uncertainty');
  if (!(k > 0) || !Number.isFinite(k))
    throw new Error(`${line.key}: coverage factor must be a positive number (got ${k})`);
  return lineOf(line, 'B', 'normal', Math.abs(expandedUncertainty) / k, dof);
}

/**
 * Combines uncorrelated lines: u_c = sqrt(sum (c_i u_i)^2); nu_eff = u_c^4 / sum((c_i u_i)^4 / nu_i)
 * over lines with finite nu and a non-zero contribution (others add nothing to the sum);
 * k from the t-distribution at (1 + p)/2 with nu_eff truncated; U = k u_c.
 */
export function combine(
  contributions: readonly Contribution[],
  coverageProbability: number = DEFAULT_COVERAGE_PROBABILITY,
): Budget {
  let variance = 0;
  let denominator = 0;
  let smallestDof = Infinity;
  for (const line of contributions) {
    requireFinite(line.contributionHz, line.key, 'contribution');
    const ci = line.contributionHz;
    variance += ci * ci;
    if (ci > 0 && Number.isFinite(line.dof)) {
      denominator += (ci * ci * ci * ci) / line.dof;
      smallestDof = Math.min(smallestDof, line.dof);
    }
  }
  const combinedHz = Math.sqrt(variance);
  // nu_eff is never below the smallest nu_i (Cauchy-Schwarz); clamp so round-off cannot make
  // 0.9999999999999999 out of 1 and lose the t-factor after truncation.
  const effectiveDof =
    denominator > 0 ? Math.max((variance * variance) / denominator, smallestDof) : Infinity;
  const k = coverageFactor(effectiveDof, coverageProbability);
  return {
    contributions: [...contributions],
    combinedHz,
    effectiveDof,
    coverageFactor: k,
    coverageProbability,
    expandedHz: k * combinedHz,
  };
}
