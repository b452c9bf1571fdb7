// One check point by the sweep method: the dial is set to a graduation and the source swept across
// the dip; the fitted resonance f0 (in the traceable source's frequency) is the reference, the
// graduation is the indication. The budget is the tune-to-dip budget of evaluate.ts with the
// operator's lines (repeatability, hysteresis, setting on the dip) replaced by the fit's standard
// uncertainty of f0, a Type A line with n - p degrees of freedom.
// Sources: JCGM 100:2008 (GUM) 4.2 and G.4 for the Type A line from a least-squares fit (its
// covariance, lsq.ts); the rest as evaluate.ts, budget.ts and conformity.ts cite.
//
// Measurement model: E = f_dial / g(T, P, RH, alpha) - f0, f0 the fitted resonance.

import type { Conditions, DecisionRule, MeterSpec, PointResult } from './model';
import { evaluatePoint } from './evaluate';
import { combine, makeContribution } from './budget';
import { decide, toleranceHz } from './conformity';

export interface SweepPointInput {
  /** The graduation the dial was set to, in dial units (Hz or divisions). */
  dialSetting: number;
  /** Fitted resonance and its standard uncertainty from the fit's covariance. */
  f0Hz: number;
  f0UncertaintyHz: number;
  /** Degrees of freedom of the fit (points used minus parameters). */
  fitDof: number;
  /** The source's certificate: relative expanded uncertainty and its coverage factor. */
  reference: { expandedUncertaintyPpm: number; coverageFactor: number };
}

/** Lines of the tune-to-dip budget that a fitted sweep replaces. */
const REPLACED = new Set(['repeatability', 'hysteresis', 'setting']);

export function evaluateSweepPoint(
  spec: MeterSpec,
  conditions: Conditions,
  input: SweepPointInput,
  rule: DecisionRule,
): PointResult {
  if (!(input.f0UncertaintyHz >= 0) || !Number.isFinite(input.f0UncertaintyHz))
    throw new Error(`fit: u(f0) must be a finite, non-negative number (got ${input.f0UncertaintyHz})`);
  if (!(input.fitDof >= 1))
    throw new Error(`fit: degrees of freedom must be at least 1 (got ${input.fitDof})`);
  // The graduation stands in as the single indication; its direction is not a fact of a sweep
  // and no line that depends on it survives below.
  const base = evaluatePoint(
    spec,
    conditions,
    {
      reference: { frequencyHz: input.f0Hz, ...input.reference },
      readings: [{ value: input.dialSetting, direction: 'up' }],
    },
    rule,
  );
  const lines = base.budget.contributions.filter((c) => !REPLACED.has(c.key));
  lines.push(
    makeContribution({
      key: 'fit',
      label: `Resonance fit of the sweep (u(f0) from the fit's covariance, ${input.fitDof} dof)`,
      type: 'A',
      distribution: 't',
      unit: 'Hz',
      standardUncertainty: input.f0UncertaintyHz,
      sensitivity: -1,
      dof: input.fitDof,
    }),
  );
  const budget = combine(lines);
  const tolerance = toleranceHz(spec, base.correctedHz);
  const decision = decide(rule, {
    errorHz: base.errorHz,
    toleranceHz: tolerance,
    combinedHz: budget.combinedHz,
    expandedHz: budget.expandedHz,
    readingHz: base.correctedHz,
  });
  const notes = base.notes.filter((n) => !/direction|repeatability|test uncertainty ratio/.test(n));
  notes.unshift('sweep method: dial set to a graduation, resonance fitted to the swept trace');
  if (decision.tur < 4) notes.push(`test uncertainty ratio ${decision.tur.toFixed(2)} is below 4`);
  return {
    ...base,
    upMeanHz: null,
    downMeanHz: null,
    budget,
    expandedPpm: (budget.expandedHz / input.f0Hz) * 1e6,
    decision,
    notes,
  };
}
