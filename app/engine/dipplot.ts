// What a technician sees of a fitted dip: the measured trace and the fitted Lorentzian dip over it,
// both in dB against the fitted baseline at f0, thinned to a size a chart draws at once. Pure.
// The curve is the scalar model of resonance.ts, P(f) = (b0 + b1 (f - f0)) (1 - A / (1 + u^2)),
// u = 2 QL (f - f0) / f0. A complex (S21) fit is drawn through |S21|^2 with the same model from its
// f0, QL, depth and baseline: a picture of the dip, not the fitted circle itself.
import type { DipFit, Trace } from './resonance';

export interface DipPlot {
  frequencyHz: number[];
  /** Measured level, dB against the fitted baseline at f0. */
  measuredDb: number[];
  /** The fitted dip at the same frequencies, dB against the same baseline. */
  fittedDb: number[];
}

function powerAt(trace: Trace, i: number): number {
  if (trace.kind === 'scalar') return trace.power[i] as number;
  const re = trace.re[i] as number;
  const im = trace.im[i] as number;
  return re * re + im * im;
}

/** The fitted model's power at f, relative to the baseline at f0 (1 far from the dip on a flat baseline). */
export function fittedRelativePower(fit: DipFit, frequencyHz: number): number {
  const u = (2 * fit.loadedQ * (frequencyHz - fit.f0Hz)) / fit.f0Hz;
  const baseline = 1 + (fit.baselineSlopePerHz * (frequencyHz - fit.f0Hz)) / fit.baselineAtF0;
  return baseline * (1 - fit.depthFraction / (1 + u * u));
}

/**
 * The trace and the fit, at most `maxPoints` points: every point when the trace is small enough,
 * otherwise every k-th point plus every point within two linewidths of f0, so the bottom of the
 * dip is never thinned away.
 */
export function dipPlot(trace: Trace, fit: DipFit, maxPoints = 600): DipPlot {
  const n = trace.frequencyHz.length;
  const ref = fit.baselineAtF0 > 0 ? fit.baselineAtF0 : 1;
  const near = 2 * fit.halfDepthBandwidthHz;
  const stride = Math.max(1, Math.ceil(n / maxPoints));
  const out: DipPlot = { frequencyHz: [], measuredDb: [], fittedDb: [] };
  let nearKept = 0;
  for (let i = 0; i < n; i++) {
    const f = trace.frequencyHz[i] as number;
    const isNear = Math.abs(f - fit.f0Hz) <= near && nearKept < maxPoints / 2;
    if (i % stride !== 0 && !isNear && i !== n - 1) continue;
    if (isNear) nearKept++;
    const p = powerAt(trace, i) / ref;
    const m = fittedRelativePower(fit, f);
    out.frequencyHz.push(f);
    // A level at or below zero (noise on a linear trace) has no dB value: drawn at the floor.
    out.measuredDb.push(p > 0 ? 10 * Math.log10(p) : -60);
    out.fittedDb.push(m > 0 ? 10 * Math.log10(m) : -60);
  }
  return out;
}
