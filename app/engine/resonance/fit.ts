// Finds and fits every dip of a trace: the candidate search, the model for the data, the fit of
// the deepest dip (the meter's resonance) and of any other (spurious responses).
// Two-tone resolution: two equal Lorentzian dips merge into one when their spacing is below
// FWHM / sqrt(3), where the second derivative of the sum at the midpoint changes sign (the Sparrow
// criterion applied to a Lorentzian line).

import { LsqError } from '../lsq';
import { findDips, windowOf, type Candidate } from './candidates';
import { fitComplexDip } from './complex-circle';
import { fitScalarDip } from './scalar-dip';
import {
  describeHz,
  pick,
  requireTrace,
  ResonanceError,
  type DipFit,
  type FitOptions,
  type ResonanceReport,
  type Trace,
} from './trace';

function fitCandidate(
  trace: Trace,
  f: Float64Array,
  power: Float64Array,
  c: Candidate,
  all: Candidate[],
): DipFit {
  const idx = windowOf(f, c, all);
  const fw = pick(f, idx);
  // Slope of the baseline across the window from its two ends (start value only).
  const first = idx[0] as number;
  const last = idx[idx.length - 1] as number;
  const edgeMean = (from: number, to: number) => {
    let s = 0;
    let k = 0;
    for (let i = from; i <= to; i++) {
      s += power[i] as number;
      k++;
    }
    return s / k;
  };
  const m = Math.max(1, Math.floor(idx.length / 20));
  const lowLevel = edgeMean(first, Math.min(first + m, last));
  const highLevel = edgeMean(Math.max(last - m, first), last);
  const span = (f[last] as number) - (f[first] as number);
  const start = {
    f0Hz: f[c.index] as number,
    widthHz: c.widthHz,
    depth: c.depth,
    baseline: Math.max(lowLevel, highLevel, power[c.index] as number),
    slopePerHz: span > 0 ? (highLevel - lowLevel) / span : 0,
  };
  start.baseline = (lowLevel + highLevel) / 2 || start.baseline;
  if (trace.kind === 'complex') return fitComplexDip(fw, pick(trace.re, idx), pick(trace.im, idx), start);
  return fitScalarDip(fw, pick(power, idx), start);
}

/**
 * Finds and fits every dip of a trace. The deepest is the meter's resonance (`main`); any other
 * is a spurious response. Throws ResonanceError with a plain message when the trace cannot give
 * a resonance: no dip, a dip at the edge of the sweep, too few points per linewidth, frequencies
 * that do not rise steadily.
 */
export function fitResonances(trace: Trace, options: FitOptions = {}): ResonanceReport {
  const { f, power } = requireTrace(trace);
  const n = f.length;
  const { candidates } = findDips(f, power);
  const main = candidates[0];
  if (!main) {
    throw new ResonanceError(
      'no-dip',
      `no dip found: nothing in the ${describeHz((f[n - 1] as number) - (f[0] as number))} sweep stands clear of the noise by more than 1 % of the level`,
    );
  }
  const minPoints = options.minPointsPerLinewidth ?? 4;
  const low = f[0] as number;
  const high = f[n - 1] as number;
  const atEdge = (c: Candidate) =>
    c.left <= 0 ||
    c.right >= n - 1 ||
    (f[c.index] as number) - c.widthHz < low ||
    (f[c.index] as number) + c.widthHz > high;
  if (atEdge(main)) {
    throw new ResonanceError(
      'edge',
      `the dip near ${describeHz(f[main.index] as number)} lies at the edge of the sweep (${describeHz(low)} to ${describeHz(high)}): sweep at least one linewidth beyond it on both sides`,
    );
  }
  const across = main.right - main.left;
  if (across < minPoints) {
    throw new ResonanceError(
      'undersampled',
      `too few points per linewidth: ${across} points across the half-depth width of the dip near ${describeHz(f[main.index] as number)} (at least ${minPoints} are needed); sweep with a finer step`,
    );
  }
  let mainFit: DipFit;
  try {
    mainFit = fitCandidate(trace, f, power, main, candidates);
  } catch (e) {
    throw new ResonanceError(
      'no-fit',
      `the dip near ${describeHz(f[main.index] as number)} could not be fitted: ${e instanceof LsqError ? e.message : String(e)}`,
    );
  }
  const notes: string[] = [];
  if (mainFit.f0Hz < low || mainFit.f0Hz > high) {
    throw new ResonanceError(
      'edge',
      `the fitted resonance ${describeHz(mainFit.f0Hz)} lies outside the sweep`,
    );
  }
  const spurious: DipFit[] = [];
  for (const c of candidates.slice(1)) {
    if (atEdge(c) || c.right - c.left < minPoints) {
      notes.push(
        `a further dip near ${describeHz(f[c.index] as number)} (${(-10 * Math.log10(1 - Math.min(c.depth, 0.999))).toFixed(2)} dB) is at the edge or too narrow to fit`,
      );
      continue;
    }
    try {
      const fit = fitCandidate(trace, f, power, c, candidates);
      // A dip the detector saw only through a bent baseline fits to nothing: keep real ones.
      if (
        fit.depthFraction >= 0.01 &&
        fit.pointsPerLinewidth >= minPoints &&
        fit.f0UncertaintyHz < 0.1 * fit.halfDepthBandwidthHz &&
        Math.abs(fit.f0Hz - (f[c.index] as number)) < 2 * c.widthHz
      )
        spurious.push(fit);
    } catch {
      notes.push(`a further dip near ${describeHz(f[c.index] as number)} could not be fitted`);
    }
  }
  if (spurious.length > 0 || notes.length > 0)
    notes.unshift('more than one dip: the extra ones are spurious responses of the meter');
  if (mainFit.depthDb < 1) notes.push(`the dip is shallow (${mainFit.depthDb.toFixed(2)} dB)`);
  return { main: mainFit, spurious, notes };
}
