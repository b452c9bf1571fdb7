// Finds and fits every dip of a trace: the candidate search, the model chosen from the data (or as
// asked) and named, the fit of the deepest dip (the meter's resonance) and of any other (spurious
// responses; a neighbour that overlaps the main dip is fitted together with it), and the fit's
// judgement of itself. Where a complex trace's phase carries the resonance, both the complex
// Q-circle and the magnitude dip are fitted and their agreement reported.
// Two-tone resolution: two equal Lorentzian dips merge into one when their spacing is below
// FWHM / sqrt(3), where the second derivative of the sum at the midpoint changes sign (the Sparrow
// criterion applied to a Lorentzian line).

import { LsqError } from '../lsq';
import { circleSignature, offResonanceMask, phaseBaseline, secondDifferenceNoise } from './baseline';
import { findDips, windowOf, type Candidate } from './candidates';
import { fitComplexDip } from './complex-circle';
import { fitJointDips } from './joint';
import { judgeFit } from './judge';
import { fitScalarDip } from './scalar-dip';
import {
  describeHz,
  pick,
  requireTrace,
  ResonanceError,
  type ComplexTrace,
  type DipFit,
  type FitJudgement,
  type FitOptions,
  type ModelChoice,
  type ResonanceReport,
  type Trace,
} from './trace';

/** A delay that turns the phase by more than this across the sweep is reported (common practice). */
const DELAY_REPORT_DEG = 10;
/** The phase carries the resonance when its circle signature is at least this part of the
 * magnitude's (about 1 for a real Q-circle; common practice). */
const PHASE_SIGNATURE_MIN = 0.3;

function edgeMean(power: ArrayLike<number>, from: number, to: number): number {
  let s = 0;
  let k = 0;
  for (let i = from; i <= to; i++) {
    s += power[i] as number;
    k++;
  }
  return s / k;
}

function scalarStart(f: Float64Array, power: Float64Array, c: Candidate, idx: number[]) {
  // Slope of the baseline across the window from its two ends (start value only).
  const first = idx[0] as number;
  const last = idx[idx.length - 1] as number;
  const m = Math.max(1, Math.floor(idx.length / 20));
  const lowLevel = edgeMean(power, first, Math.min(first + m, last));
  const highLevel = edgeMean(power, Math.max(last - m, first), last);
  const span = (f[last] as number) - (f[first] as number);
  return {
    f0Hz: f[c.index] as number,
    widthHz: c.widthHz,
    depth: c.depth,
    baseline: (lowLevel + highLevel) / 2 || Math.max(lowLevel, highLevel, power[c.index] as number),
    slopePerHz: span > 0 ? (highLevel - lowLevel) / span : 0,
  };
}

interface Fitted {
  fit: DipFit;
  idx: number[];
  others?: DipFit[];
}

function fitMagnitude(f: Float64Array, power: Float64Array, c: Candidate, all: Candidate[]): Fitted {
  const idx = windowOf(f, c, all);
  return { fit: fitScalarDip(pick(f, idx), pick(power, idx), scalarStart(f, power, c, idx)), idx };
}

/** The complex fit; with the cable (delay and tilt) as parameters only where the sweep reaches
 * off resonance, since across a linewidth or two a delay cannot be told from the circle's rotation. */
function fitComplex(
  f: Float64Array,
  trace: ComplexTrace,
  c: Candidate,
  all: Candidate[],
  delayS: number,
  extended: boolean,
): Fitted {
  const idx = windowOf(f, c, all);
  const start = { f0Hz: f[c.index] as number, widthHz: c.widthHz, delayS };
  return { fit: fitComplexDip(pick(f, idx), pick(trace.re, idx), pick(trace.im, idx), start, extended), idx };
}

/** Indices from `lowHz` to `highHz`. */
function span(f: Float64Array, lowHz: number, highHz: number): number[] {
  const out: number[] = [];
  for (let i = 0; i < f.length; i++) if ((f[i] as number) >= lowHz && (f[i] as number) <= highHz) out.push(i);
  return out;
}

/** A fitted neighbour that is a dip of its own, not noise or a bend of the baseline. */
function realDip(fit: DipFit, foundHz: number, foundWidthHz: number, minPoints: number): boolean {
  return (
    fit.depthFraction >= 0.01 &&
    fit.pointsPerLinewidth >= minPoints &&
    fit.f0UncertaintyHz < 0.1 * fit.halfDepthBandwidthHz &&
    Math.abs(fit.f0Hz - foundHz) < 2 * foundWidthHz
  );
}

function noFit(f: Float64Array, c: Candidate, e: unknown): ResonanceError {
  return new ResonanceError(
    'no-fit',
    `the dip near ${describeHz(f[c.index] as number)} could not be fitted: ${e instanceof LsqError ? e.message : String(e)}`,
  );
}

/**
 * Finds and fits every dip of a trace. The deepest is the meter's resonance (`main`); any other
 * is a spurious response. Throws ResonanceError with a plain message when the trace cannot give
 * a resonance: no dip, a dip at the edge of the sweep, too few points per linewidth, frequencies
 * that do not rise steadily. A fit that fails its own judgement is returned with
 * `judgement.ok` false and the reasons; `requireTrustworthy` turns that into a refusal.
 */
export function fitResonances(trace: Trace, options: FitOptions = {}): ResonanceReport {
  const { f, power } = requireTrace(trace);
  const n = f.length;
  const requested = options.model ?? 'auto';
  if (requested === 'complex' && trace.kind !== 'complex')
    throw new ResonanceError(
      'invalid',
      'the complex model needs complex S21 (a Touchstone file, or real and imaginary columns); this trace holds a level only: use the magnitude model',
    );
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
  const notes: string[] = [];
  const { mask, clear } = offResonanceMask(f, candidates);
  const powerNoise = secondDifferenceNoise(power, mask);
  const judgeMagnitude = (x: Fitted): FitJudgement =>
    judgeFit(x.fit, {
      traceHz: f,
      frequencyHz: pick(f, x.idx),
      power: pick(power, x.idx),
      noise: powerNoise,
      minPointsPerLinewidth: minPoints,
      others: x.others,
    });
  // Every other dip, first on its own with the magnitude model; one that fits to nothing (a dip
  // the detector saw only through a bent baseline, or noise) is left out.
  const neighbours: { c: Candidate; fit: DipFit }[] = [];
  const extraNotes: string[] = [];
  for (const c of candidates.slice(1)) {
    if (atEdge(c) || c.right - c.left < minPoints) {
      extraNotes.push(
        `a further dip near ${describeHz(f[c.index] as number)} (${(-10 * Math.log10(1 - Math.min(c.depth, 0.999))).toFixed(2)} dB) is at the edge or too narrow to fit`,
      );
      continue;
    }
    try {
      const fit = fitMagnitude(f, power, c, candidates).fit;
      if (realDip(fit, f[c.index] as number, c.widthHz, minPoints)) neighbours.push({ c, fit });
    } catch {
      extraNotes.push(`a further dip near ${describeHz(f[c.index] as number)} could not be fitted`);
    }
  }
  // Neighbours inside the main dip's fit window are fitted together with it.
  const mainHz = f[main.index] as number;
  let overlapping = neighbours
    .map((x) => x.c)
    .filter((c) => Math.abs((f[c.index] as number) - mainHz) < 6 * main.widthHz + 3 * c.widthHz);
  let jointSpurious: DipFit[] = [];
  let magnitude: Fitted | null = null;
  if (overlapping.length > 0) {
    const group = [main, ...overlapping];
    const idx = span(
      f,
      Math.min(...group.map((c) => (f[c.index] as number) - 6 * c.widthHz)),
      Math.max(...group.map((c) => (f[c.index] as number) + 6 * c.widthHz)),
    );
    try {
      const fits = fitJointDips(
        pick(f, idx),
        pick(power, idx),
        group.map((c) => ({ f0Hz: f[c.index] as number, widthHz: c.widthHz, depth: c.depth })),
      );
      if (
        fits.every((x, k) =>
          realDip(x, f[(group[k] as Candidate).index] as number, (group[k] as Candidate).widthHz, minPoints),
        )
      ) {
        magnitude = { fit: fits[0] as DipFit, idx, others: fits.slice(1) };
        jointSpurious = fits.slice(1);
        notes.push(
          `${overlapping.length === 1 ? 'a neighbouring dip overlaps' : `${overlapping.length} neighbouring dips overlap`} the resonance: fitted together with it (magnitude model)`,
        );
      }
    } catch (e) {
      if (!(e instanceof LsqError)) throw e;
    }
    if (!magnitude) overlapping = [];
  }
  try {
    magnitude ??= fitMagnitude(f, power, main, candidates);
  } catch (e) {
    throw noFit(f, main, e);
  }
  let chosen: Fitted = magnitude;
  let judgement = judgeMagnitude(magnitude);
  let choice: ModelChoice = {
    requested,
    used: 'magnitude',
    reason:
      trace.kind === 'complex'
        ? 'the magnitude model was asked for'
        : 'the trace holds a level only (no phase)',
    alternative: null,
    agreement: null,
  };
  let delayS = 0;
  if (trace.kind === 'complex') {
    const phase = phaseBaseline(f, trace.re, trace.im, mask);
    delayS = phase.delayS;
    const dMag = 1 - Math.sqrt(1 - Math.min(magnitude.fit.depthFraction, 0.999));
    const signature = circleSignature(
      f,
      phase.residualRad,
      magnitude.fit.f0Hz,
      magnitude.fit.loadedQ,
      phase.noiseRad,
    );
    const carries =
      signature.amplitude >= PHASE_SIGNATURE_MIN * dMag && signature.amplitude > 3 * signature.uncertainty;
    if (clear && phase.turnDeg > DELAY_REPORT_DEG)
      notes.push(
        `electrical delay ${(delayS * 1e9).toPrecision(3)} ns from the off-resonance phase (it turns ${phase.turnDeg.toFixed(0)} degrees across the sweep)`,
      );
    const complexWanted =
      requested === 'complex' || (requested === 'auto' && carries && overlapping.length === 0);
    if (requested === 'auto' && !complexWanted)
      choice.reason =
        overlapping.length > 0
          ? 'the dips overlap: fitted together with the magnitude model'
          : `the phase carries no resonance (its Q-circle signature ${((signature.amplitude * 180) / Math.PI).toFixed(2)} degrees against about ${((dMag * 180) / Math.PI).toFixed(2)} expected from the magnitude dip): magnitude model`;
    if (complexWanted) {
      let complex: Fitted | null = null;
      let complexError = '';
      try {
        complex = fitComplex(f, trace, main, candidates, delayS, clear);
      } catch (e) {
        if (requested === 'complex') throw noFit(f, main, e);
        complexError = e instanceof Error ? e.message : String(e);
      }
      const sNoise = Math.sqrt(
        (secondDifferenceNoise(trace.re, mask) ** 2 + secondDifferenceNoise(trace.im, mask) ** 2) / 2,
      );
      const complexJudgement = complex
        ? judgeFit(complex.fit, {
            traceHz: f,
            frequencyHz: pick(f, complex.idx),
            power: pick(power, complex.idx),
            noise: sNoise,
            minPointsPerLinewidth: minPoints,
          })
        : null;
      if (requested === 'complex' && complex && complexJudgement) {
        chosen = complex;
        judgement = complexJudgement;
        choice = {
          requested,
          used: 'complex',
          reason: 'the complex model was asked for',
          alternative: null,
          agreement: null,
        };
      } else if (complex && complexJudgement && (complexJudgement.ok || !judgement.ok)) {
        const c = complex.fit;
        const m = magnitude.fit;
        const f0Sigma = Math.abs(c.f0Hz - m.f0Hz) / Math.hypot(c.f0UncertaintyHz, m.f0UncertaintyHz);
        const agree =
          f0Sigma <= 3 &&
          Math.abs(c.loadedQ - m.loadedQ) <= 3 * Math.hypot(c.loadedQUncertainty, m.loadedQUncertainty);
        choice = {
          requested,
          used: 'complex',
          reason:
            'the phase carries the resonance: complex Q-circle model (NPL MAT 58), the magnitude model fitted beside it',
          alternative: m,
          agreement: {
            f0DifferenceHz: c.f0Hz - m.f0Hz,
            f0DifferenceSigma: f0Sigma,
            loadedQRatio: c.loadedQ / m.loadedQ,
            agree,
          },
        };
        notes.push(
          agree
            ? `the complex and magnitude models agree: f0 within ${f0Sigma.toFixed(1)} combined standard uncertainties, QL ratio ${(c.loadedQ / m.loadedQ).toFixed(4)}`
            : `the complex and magnitude models differ: f0 by ${describeHz(Math.abs(c.f0Hz - m.f0Hz))} (${f0Sigma.toFixed(1)} combined standard uncertainties), QL ratio ${(c.loadedQ / m.loadedQ).toFixed(4)}; a rotated Q-circle makes the magnitude dip asymmetric, which only the complex model describes`,
        );
        chosen = complex;
        judgement = complexJudgement;
      } else {
        choice.reason = `the complex model was refused (${complexJudgement?.problems[0] ?? complexError}): magnitude model`;
        if (complex) choice.alternative = complex.fit;
      }
    }
  }
  const mainFit = chosen.fit;
  if (
    mainFit.electricalDelayS !== undefined &&
    phaseTurnDeg(mainFit.electricalDelayS, low, high) > DELAY_REPORT_DEG
  )
    notes.push(
      `electrical delay fitted: ${(mainFit.electricalDelayS * 1e9).toPrecision(4)} ns +/- ${((mainFit.electricalDelayUncertaintyS ?? 0) * 1e9).toPrecision(2)} ns`,
    );
  const spurious: DipFit[] = [...jointSpurious];
  for (const { c, fit } of neighbours) {
    if (overlapping.includes(c)) continue;
    if (choice.used !== 'complex' || trace.kind !== 'complex') {
      spurious.push(fit);
      continue;
    }
    try {
      const cf = fitComplex(f, trace, c, candidates, delayS, clear).fit;
      spurious.push(realDip(cf, f[c.index] as number, c.widthHz, minPoints) ? cf : fit);
    } catch {
      spurious.push(fit);
    }
  }
  spurious.sort((a, b) => b.depthFraction - a.depthFraction);
  if (spurious.length > 0 || extraNotes.length > 0)
    notes.unshift('more than one dip: the extra ones are spurious responses of the meter');
  notes.push(...extraNotes);
  if (mainFit.depthDb < 1) notes.push(`the dip is shallow (${mainFit.depthDb.toFixed(2)} dB)`);
  return { main: mainFit, spurious, notes, model: choice, judgement };
}

function phaseTurnDeg(delayS: number, lowHz: number, highHz: number): number {
  return Math.abs(360 * delayS * (highHz - lowHz));
}

/** Throws a refusal with the reasons when a fit failed its own judgement; the report otherwise. */
export function requireTrustworthy(report: ResonanceReport): ResonanceReport {
  if (report.judgement && !report.judgement.ok)
    throw new ResonanceError(
      'untrustworthy',
      `the fit cannot be trusted: ${report.judgement.problems.join('; ')}`,
    );
  return report;
}
