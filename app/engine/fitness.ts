// Fit for use at a frequency: the correction to a reading there from the newest check's errors
// along the band, and the uncertainty of a reading taken now. The budget is the GUM's: standard
// uncertainties of independent inputs combined by root sum of squares (JCGM 100:2008 5.1.2), a
// bound known only by its half-width a taken as rectangular, u = a / sqrt(3) (JCGM 100:2008
// 4.3.7), and U = k u_c with k for infinite degrees of freedom (JCGM 100:2008 6.2, 6.3).
import { coverageFactor } from './distributions';
import { formatFrequency } from './quantity';

/** One point of the newest check, in ppm of its reference frequency. */
export interface UsePoint {
  frequencyHz: number;
  errorPpm: number;
  /** Combined standard uncertainty of the error. */
  uPpm: number;
  /** The reference source's line of that budget (a reading now has its own reference). */
  uReferencePpm: number;
}

/** The newest check's error at a frequency, with what its uncertainty is made of. */
export interface CorrectionBasis {
  errorPpm: number;
  /** Standard uncertainty of the error taken from the check. */
  uPpm: number;
  /** Interpolation between check frequencies (0 at a check frequency and outside the band). */
  uInterpolationPpm: number;
  /** A reading's own part: the check's budget without its reference source. */
  uReadingPpm: number;
  basis: string;
}

const withoutReference = (p: UsePoint) => Math.sqrt(Math.max(p.uPpm ** 2 - p.uReferencePpm ** 2, 0));

/** Linear interpolation along the band of the newest check's errors at `hz`; outside the
 * checked frequencies the nearest one, never extrapolated. Null without points. */
export function correctionAt(points: readonly UsePoint[], hz: number): CorrectionBasis | null {
  const sorted = [...points].sort((a, b) => a.frequencyHz - b.frequencyHz);
  const first = sorted[0];
  const last = sorted[sorted.length - 1];
  if (!first || !last) return null;
  const one = (p: UsePoint, basis: string): CorrectionBasis => ({
    errorPpm: p.errorPpm,
    uPpm: p.uPpm,
    uInterpolationPpm: 0,
    uReadingPpm: withoutReference(p),
    basis,
  });
  if (hz <= first.frequencyHz)
    return one(
      first,
      `nearest check frequency ${formatFrequency(first.frequencyHz, 6)} (below it, not extrapolated)`,
    );
  if (hz >= last.frequencyHz)
    return one(
      last,
      `nearest check frequency ${formatFrequency(last.frequencyHz, 6)} (above it, not extrapolated)`,
    );
  for (let i = 1; i < sorted.length; i++) {
    const lo = sorted[i - 1] as UsePoint;
    const hi = sorted[i] as UsePoint;
    if (hz < lo.frequencyHz || hz > hi.frequencyHz) continue;
    if (hz === lo.frequencyHz) return one(lo, `check frequency ${formatFrequency(lo.frequencyHz, 6)}`);
    if (hz === hi.frequencyHz) return one(hi, `check frequency ${formatFrequency(hi.frequencyHz, 6)}`);
    const a = (hz - lo.frequencyHz) / (hi.frequencyHz - lo.frequencyHz);
    return {
      errorPpm: (1 - a) * lo.errorPpm + a * hi.errorPpm,
      // Neighbouring points share the reference and most conditions: taken as fully correlated.
      uPpm: (1 - a) * lo.uPpm + a * hi.uPpm,
      // Between check frequencies the error is not known exactly: rectangular, half-width half
      // the difference of the neighbours (common practice).
      uInterpolationPpm: Math.abs(hi.errorPpm - lo.errorPpm) / 2 / Math.sqrt(3),
      uReadingPpm: (1 - a) * withoutReference(lo) + a * withoutReference(hi),
      basis: `interpolated between ${formatFrequency(lo.frequencyHz, 6)} and ${formatFrequency(hi.frequencyHz, 6)}`,
    };
  }
  return null;
}

/** A drift rate known at one frequency (null where no line was fitted). */
export interface DriftAtFrequency {
  frequencyHz: number;
  slopePpmPerYear: number | null;
}

/** Drift rate (ppm per year) at a frequency: interpolated between the fitted frequencies around
 * it, the nearest one outside them, else the pooled rate; null when none is known. `fitted` is
 * in increasing frequency. */
export function slopeAt(
  fitted: readonly DriftAtFrequency[],
  pooledPpmPerYear: number | null,
  hz: number,
): number | null {
  const withFit = fitted.filter((f) => f.slopePpmPerYear !== null);
  if (withFit.length === 0) return pooledPpmPerYear;
  let lo = withFit[0];
  let hi = withFit[withFit.length - 1];
  for (const f of withFit) {
    if (f.frequencyHz <= hz) lo = f;
    if (f.frequencyHz >= hz && hi && f.frequencyHz < hi.frequencyHz) hi = f;
  }
  if (lo?.slopePpmPerYear == null || hi?.slopePpmPerYear == null) return null;
  if (hi.frequencyHz === lo.frequencyHz || hz <= lo.frequencyHz) return lo.slopePpmPerYear;
  if (hz >= hi.frequencyHz) return hi.slopePpmPerYear;
  const t = (hz - lo.frequencyHz) / (hi.frequencyHz - lo.frequencyHz);
  return (1 - t) * lo.slopePpmPerYear + t * hi.slopePpmPerYear;
}

export interface UseBudgetLine {
  label: string;
  uPpm: number;
}

export interface UseBudget {
  /** The correction to add to a reading: the negative of the error found. */
  correctionPpm: number;
  /** Its standard uncertainty: the check's and the interpolation's. */
  uCorrectionPpm: number;
  /** Drift predicted since the check (0 without a rate); in the uncertainty, not the correction. */
  driftPpm: number;
  lines: UseBudgetLine[];
  combinedPpm: number;
  coverageFactor: number;
  expandedPpm: number;
}

/** The uncertainty budget of a reading taken `yearsSinceCheck` after the check, at a frequency
 * where the correction is `c` and the drift rate `slopePpmPerYear` (null: none known). The
 * predicted drift enters as a rectangular bound of its own size (JCGM 100:2008 4.3.7). */
export function useBudget(
  c: CorrectionBasis,
  slopePpmPerYear: number | null,
  yearsSinceCheck: number,
): UseBudget {
  const driftPpm = slopePpmPerYear === null ? 0 : slopePpmPerYear * yearsSinceCheck;
  const lines: UseBudgetLine[] = [
    { label: 'correction from the last check (its combined uncertainty)', uPpm: c.uPpm },
    { label: 'interpolation between check frequencies', uPpm: c.uInterpolationPpm },
    {
      label: 'your reading (repeatability, resolution, setting, conditions as at the check)',
      uPpm: c.uReadingPpm,
    },
    { label: 'drift since the last check (rectangular)', uPpm: Math.abs(driftPpm) / Math.sqrt(3) },
  ];
  const combinedPpm = Math.sqrt(lines.reduce((s, l) => s + l.uPpm ** 2, 0));
  const k = coverageFactor(Infinity);
  return {
    correctionPpm: -c.errorPpm,
    uCorrectionPpm: Math.hypot(c.uPpm, c.uInterpolationPpm),
    driftPpm,
    lines,
    combinedPpm,
    coverageFactor: k,
    expandedPpm: k * combinedPpm,
  };
}
