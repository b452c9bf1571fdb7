// The history engine on invented series: segments and steps, dip health, and the interval
// methods' rules (policy bounds, staircase, alert zone, variables-data method).
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { analyseDrift, analyseHealth, fitLine, type HistoryCheck } from '../../app/engine/drift';
import {
  applyAlertZone,
  applyPolicy,
  suggestByStaircase,
  suggestByVariables,
  variablesInterval,
} from '../../app/engine/intervals';

const policy = { minMonths: 6, maxMonths: 36 };

/** A meter checked yearly at two frequencies, error = 20 + drift t (+ a step from `stepAt`). */
function series(
  years: number,
  drift: number,
  step?: { at: number; ppm: number; adjust?: boolean },
): HistoryCheck[] {
  const out: HistoryCheck[] = [];
  for (let i = 0; i < years; i++) {
    const jitter = ((i * 37) % 7) - 3; // deterministic scatter of a few ppm
    const shift = step && i >= step.at ? step.ppm : 0;
    const e = (f: number) => 20 + drift * i + shift + jitter + (f === 1e10 ? 5 : 0);
    const pts = [9e9, 1e10].map((f) => ({
      frequencyHz: f,
      phase: 'as-found' as const,
      errorPpm: e(f),
      uPpm: 8,
      tolerancePpm: 1000,
    }));
    const adjusted = step?.adjust === true && i === step.at;
    const left = adjusted ? pts.map((p) => ({ ...p, phase: 'as-left' as const, errorPpm: 10 })) : [];
    out.push({ tYears: i - (years - 1), adjusted, points: [...pts, ...left] });
  }
  return out;
}

describe('drift segments and steps', () => {
  it('fits the whole history of a steady meter and finds no step', () => {
    const a = analyseDrift(series(10, 30));
    expect(a.steps.some((s) => s.isStep)).toBe(false);
    expect(a.currentSegment).toBe(0);
    const f = a.frequencies[0];
    expect(f?.fit?.n).toBe(10);
    expect(f?.fit?.slope).toBeCloseTo(30, 0);
    expect(a.pooled?.driftPpmPerYear).toBeCloseTo(30, 0);
  });

  it('flags a step of +300 ppm and fits only from it on (no extrapolation across it)', () => {
    const a = analyseDrift(series(12, 5, { at: 7, ppm: 300 }));
    const steps = a.steps.filter((s) => s.isStep);
    expect(steps).toHaveLength(1);
    expect(steps[0]?.checkIndex).toBe(7);
    expect(a.currentSegment).toBe(1);
    expect(a.segmentStartYears).toBe(7 - 11);
    expect(a.frequencies[0]?.fit?.n).toBe(5);
    expect(a.frequencies[0]?.observations.filter((o) => o.segment === 0)).toHaveLength(7);
  });

  it('starts a new segment at the as-left points of an adjusted check', () => {
    const a = analyseDrift(series(12, 5, { at: 7, ppm: 300, adjust: true }));
    const used = a.frequencies[0]?.observations.filter((o) => o.segment === a.currentSegment) ?? [];
    expect(used[0]?.phase).toBe('as-left');
    expect(used).toHaveLength(5);
  });

  it('never flags a straight drift without scatter, whatever its rate (property)', () => {
    fc.assert(
      fc.property(fc.double({ min: -200, max: 200, noNaN: true }), (drift) => {
        const checks = series(8, drift).map((c) => ({
          ...c,
          points: c.points.map((p) => ({ ...p, errorPpm: 20 + drift * c.tYears })),
        }));
        return analyseDrift(checks).steps.every((s) => !s.isStep);
      }),
    );
  });

  it('refuses checks out of time order', () => {
    const s = series(4, 1);
    expect(() => analyseDrift([s[1] as HistoryCheck, s[0] as HistoryCheck])).toThrow(/time order/);
  });

  it('needs three points for a line', () => {
    expect(() =>
      fitLine([
        { x: 0, y: 1 },
        { x: 1, y: 2 },
      ]),
    ).toThrow(/at least 3/);
  });
});

describe('dip health', () => {
  const checks = (depths: number[]) =>
    depths.map((d, i) => ({ tYears: i, dipDepthsDb: [d, d + 0.3], loadedQ: [] }));

  it('flags a dip that fades by 30 % or more, and one under the minimum', () => {
    const fading = analyseHealth(checks([4, 3.6, 3.1, 2.7, 2.2, 1.8]), 1);
    expect(fading.fading).toBe(true);
    expect(fading.belowMinimum).toBe(false);
    expect(fading.dipReachesMinimumYears).toBeGreaterThan(5);
    const under = analyseHealth(checks([2, 1.5, 0.9]), 1);
    expect(under.belowMinimum).toBe(true);
    const steady = analyseHealth(checks([4.6, 4.5, 4.6, 4.4, 4.5]), 1);
    expect(steady.fading).toBe(false);
  });
});

describe('interval rules', () => {
  it('rounds down to whole months and keeps to the policy bounds', () => {
    expect(applyPolicy(17.9, policy)).toEqual({ months: 17, boundedBy: null });
    expect(applyPolicy(2, policy)).toEqual({ months: 6, boundedBy: 'minimum' });
    expect(applyPolicy(Infinity, policy)).toEqual({ months: 36, boundedBy: 'maximum' });
  });

  it('steps the staircase: shorter when found out, longer when comfortably in, else the same', () => {
    expect(suggestByStaircase({ inTolerance: false, worstUsedFraction: 1.2 }, 12, policy, '').months).toBe(6);
    expect(suggestByStaircase({ inTolerance: true, worstUsedFraction: 0.3 }, 12, policy, '').months).toBe(15);
    const same = suggestByStaircase({ inTolerance: true, worstUsedFraction: 0.7 }, 12, policy, '');
    expect(same.change).toBe('same');
    expect(same.rationale).toMatch(/method 1/);
  });

  it('variables-data method: the longest interval whose end keeps p_c at the target', () => {
    // Error 800 ppm now, +100 ppm a year, tolerance 1000 ppm: p_c falls under 95 % before 2 years.
    const pts = [-4, -3, -2, -1, 0].map((t, i) => ({ x: t, y: 800 + 100 * t + (i % 2 ? 2 : -2), u: 5 }));
    const f = { frequencyHz: 1e10, fit: fitLine(pts, 'residual-or-stated'), tolerancePpm: 1000, uNewPpm: 5 };
    const r = variablesInterval([f], 0, 0.95, 48);
    expect(r.months).toBeGreaterThan(12);
    expect(r.months).toBeLessThan(24);
    expect(r.conformityAtEnd).toBeGreaterThanOrEqual(0.95);
    expect(r.conformityAfter as number).toBeLessThan(0.95);
    const s = suggestByVariables([f], 0, 0.95, 12, policy, (hz) => `${hz / 1e9} GHz`);
    expect(s.months).toBe(r.months);
    expect(s.rationale).toMatch(/variables-data method/);
    // Found at 80 % of the tolerance and not adjusted: the alert zone halves the interval.
    const alert = applyAlertZone(s, { worstUsedFraction: 0.8, adjusted: false }, policy);
    expect(alert.months).toBe(6);
    expect(alert.change).toBe('shorter');
    expect(alert.rationale).toMatch(/alert level of 80 %/);
    expect(applyAlertZone(s, { worstUsedFraction: 0.8, adjusted: true }, policy).months).toBe(s.months);
  });
});
