// A division dial's chart (micrometer divisions -> frequency) fitted from check points with a
// physical cavity model, or a monotone interpolant where neither model fits; its residuals, which
// model won, and the inverse (frequency -> divisions) for a printable chart table.
// Sources:
// - Cylindrical TE011 cavity tuned by a plunger: f^2 = (c p'01 / (2 pi a))^2 + (c / 2)^2 / L^2
//   (Pozar, Microwave Engineering, 4th ed., 6.7, with l = 1); the cavity length L is linear in the
//   dial, L = s (d - d0), so f^2 = A + C / (d - d0)^2.
// - Capacitively loaded coaxial cavity (a quarter-wave line shortened by an end capacitance C):
//   resonance where Z0 tan(2 pi f l / c) = 1 / (2 pi f C) (Pozar 6.1-6.2, transmission-line
//   resonators), with l(d) = l0 + k d. With theta = 2 pi f l / c and tau = Z0 C, theta tan(theta) =
//   l / (c tau), solved on the fundamental branch 0 < theta < pi/2.
// - Fallback: Fritsch-Carlson monotone cubic through the points (chart.ts), its residuals taken by
//   leaving each interior point out, so the figure is not zero by construction.
// A physical model is accepted when its largest residual is within a quarter of the meter's stated
// relative accuracy (common practice: the chart's own error well inside the tolerance).

import { createChart, divisionsAtFrequency, frequencyAtDivisions } from '../chart';
import type { ChartPoint } from '../model';
import { fitCoaxial, fitTe011, modelFrequencyHz, residualsOf, stats } from './cavity-model';
import { interpolantResiduals } from './monotone';
import {
  DialChartError,
  type DialCandidate,
  type DialChartFit,
  type DialModel,
  type DialModelKind,
  type DialResidual,
} from './types';

/** Divisions at which the chart gives frequencyHz, inside [lo, hi] (bisection on a monotone model). */
export function modelDivisions(fit: DialChartFit, frequencyHz: number): number {
  if (fit.model.kind === 'monotone-interpolant')
    return divisionsAtFrequency(fit.model.knots, frequencyHz, 'frequency');
  const m = fit.model;
  let lo = fit.minDivisions;
  let hi = fit.maxDivisions;
  const fLo = modelFrequencyHz(m, lo);
  const fHi = modelFrequencyHz(m, hi);
  const rising = fHi > fLo;
  if (frequencyHz < Math.min(fLo, fHi) || frequencyHz > Math.max(fLo, fHi))
    throw new DialChartError(
      `${frequencyHz} Hz is outside the chart (${Math.min(fLo, fHi)} Hz to ${Math.max(fLo, fHi)} Hz)`,
    );
  for (let i = 0; i < 200; i++) {
    const mid = (lo + hi) / 2;
    const v = modelFrequencyHz(m, mid);
    if (rising ? v < frequencyHz : v > frequencyHz) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/**
 * Fits a divisions chart to measured points (divisions, frequency at the meter's reference
 * conditions). `acceptPpm` is the largest residual a physical model may leave (a quarter of the
 * meter's relative accuracy, common practice). Throws DialChartError for fewer than 2 points or
 * points that are not monotone.
 */
export function fitDialChart(points: ChartPoint[], acceptPpm: number): DialChartFit {
  if (points.length < 2) throw new DialChartError(`a chart needs at least 2 points (${points.length} given)`);
  const sorted = [...points].sort((a, b) => a.divisions - b.divisions);
  try {
    createChart(sorted, 'points');
  } catch (e) {
    throw new DialChartError(e instanceof Error ? e.message : String(e));
  }
  const minDivisions = sorted[0]?.divisions ?? 0;
  const maxDivisions = sorted[sorted.length - 1]?.divisions ?? 0;
  const candidates: DialCandidate[] = [];
  const fits: { model: DialModel; residuals: DialResidual[]; rms: number; max: number }[] = [];
  const notes: string[] = [];
  const physical: [DialModelKind, (p: ChartPoint[]) => DialModel | null][] = [
    ['cylindrical-te011', fitTe011],
    ['coaxial-loaded', fitCoaxial],
  ];
  for (const [kind, fit] of physical) {
    if (sorted.length < 4) {
      candidates.push({
        model: kind,
        accepted: false,
        rmsResidualPpm: null,
        maxResidualPpm: null,
        reason: 'needs at least 4 points (3 parameters and a residual)',
      });
      continue;
    }
    const model = fit(sorted);
    if (!model) {
      candidates.push({
        model: kind,
        accepted: false,
        rmsResidualPpm: null,
        maxResidualPpm: null,
        reason: 'does not converge on these points',
      });
      continue;
    }
    const residuals = residualsOf(sorted, (d) => modelFrequencyHz(model, d));
    const { rms, max } = stats(residuals);
    const accepted = Number.isFinite(max) && max <= acceptPpm;
    candidates.push({
      model: kind,
      accepted,
      rmsResidualPpm: rms,
      maxResidualPpm: max,
      reason: accepted
        ? `largest residual ${max.toFixed(1)} ppm within ${acceptPpm.toFixed(0)} ppm`
        : `largest residual ${max.toFixed(1)} ppm exceeds ${acceptPpm.toFixed(0)} ppm`,
    });
    if (accepted) fits.push({ model, residuals, rms, max });
  }
  fits.sort((a, b) => a.rms - b.rms);
  const winner = fits[0];
  if (winner) {
    candidates.push({
      model: 'monotone-interpolant',
      accepted: false,
      rmsResidualPpm: null,
      maxResidualPpm: null,
      reason: 'not needed: a physical model fits',
    });
    return {
      model: winner.model,
      residuals: winner.residuals,
      rmsResidualPpm: winner.rms,
      maxResidualPpm: winner.max,
      candidates,
      minDivisions,
      maxDivisions,
      notes,
    };
  }
  const residuals = interpolantResiduals(sorted);
  const { rms, max } = stats(residuals);
  candidates.push({
    model: 'monotone-interpolant',
    accepted: true,
    rmsResidualPpm: rms,
    maxResidualPpm: max,
    reason:
      sorted.length >= 4
        ? 'fallback; residuals by leaving each interior point out'
        : 'fallback; too few points for a residual',
  });
  notes.push(
    'no physical model fits within the limit: the chart is the monotone interpolant through the points',
  );
  return {
    model: { kind: 'monotone-interpolant', knots: sorted },
    residuals,
    rmsResidualPpm: rms,
    maxResidualPpm: max,
    candidates,
    minDivisions,
    maxDivisions,
    notes,
  };
}

export interface ChartTableRow {
  divisions: number;
  frequencyHz: number;
}

/** Rows of a printable chart: every `stepDivisions` across the chart's range (ends included). */
export function chartTable(fit: DialChartFit, stepDivisions: number): ChartTableRow[] {
  if (!(stepDivisions > 0)) throw new DialChartError('the table step must be a positive number of divisions');
  const rows: ChartTableRow[] = [];
  const first = Math.ceil(fit.minDivisions / stepDivisions - 1e-9) * stepDivisions;
  const count = Math.floor((fit.maxDivisions - first) / stepDivisions + 1e-9);
  if (count > 10000) throw new DialChartError('the table step is too small for the chart range');
  for (let i = 0; i <= count; i++) {
    const d = Math.round((first + i * stepDivisions) * 1e9) / 1e9;
    rows.push({
      divisions: d,
      frequencyHz:
        fit.model.kind === 'monotone-interpolant'
          ? frequencyAtDivisions(fit.model.knots, d)
          : modelFrequencyHz(fit.model, d),
    });
  }
  return rows;
}
