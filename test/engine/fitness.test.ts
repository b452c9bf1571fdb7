// Fit for use at a frequency (app/engine/fitness.ts): the correction interpolated from the newest
// check, the drift rate there, and the uncertainty budget of a reading taken now. The budget's
// rules are JCGM 100:2008 (GUM): root sum of squares of independent standard uncertainties
// (5.1.2), a bound of half-width a as rectangular, u = a / sqrt(3) (4.3.7), and U = k u_c with
// k = 2.00 for 95.45 % at infinite degrees of freedom (Table G.2). Linear interpolation along the
// band and the interpolation line (half the neighbours' difference, rectangular) are common
// practice.
import { describe, expect, it } from 'vitest';
import { correctionAt, slopeAt, useBudget, type UsePoint } from '../../app/engine/fitness';

const points: UsePoint[] = [
  { frequencyHz: 10e9, errorPpm: 20, uPpm: 5, uReferencePpm: 3 },
  { frequencyHz: 9e9, errorPpm: 10, uPpm: 4, uReferencePpm: 3 },
];

describe('correction from the newest check', () => {
  it('interpolates linearly between check frequencies, the points taken fully correlated', () => {
    const c = correctionAt(points, 9.5e9);
    expect(c).not.toBeNull();
    expect(c!.errorPpm).toBeCloseTo(15, 12);
    expect(c!.uPpm).toBeCloseTo(4.5, 12);
    // Half the neighbours' difference (5 ppm) as a rectangular bound: 5 / sqrt(3) (GUM 4.3.7).
    expect(c!.uInterpolationPpm).toBeCloseTo(5 / Math.sqrt(3), 12);
    // A reading's own part: each budget without its reference line, sqrt(u^2 - uRef^2).
    expect(c!.uReadingPpm).toBeCloseTo(0.5 * Math.sqrt(7) + 0.5 * 4, 12);
    expect(c!.basis).toBe('interpolated between 9.00000 GHz and 10.0000 GHz');
  });

  it('takes the nearest check frequency outside the checked span, never extrapolating', () => {
    const below = correctionAt(points, 8e9)!;
    expect(below.errorPpm).toBe(10);
    expect(below.uInterpolationPpm).toBe(0);
    expect(below.basis).toContain('not extrapolated');
    const above = correctionAt(points, 12e9)!;
    expect(above.errorPpm).toBe(20);
    expect(above.uReadingPpm).toBe(4);
    expect(correctionAt(points, 9e9)!.basis).toContain('nearest check frequency 9.00000 GHz');
  });

  it('gives nothing without points', () => {
    expect(correctionAt([], 9e9)).toBeNull();
  });
});

describe('drift rate at a frequency', () => {
  const fitted = [
    { frequencyHz: 9e9, slopePpmPerYear: 2 },
    { frequencyHz: 10e9, slopePpmPerYear: null },
    { frequencyHz: 11e9, slopePpmPerYear: 6 },
  ];
  it('interpolates between the fitted frequencies around it, skipping those without a line', () => {
    expect(slopeAt(fitted, 1, 10e9)).toBeCloseTo(4, 12);
    expect(slopeAt(fitted, 1, 8e9)).toBe(2);
    expect(slopeAt(fitted, 1, 12e9)).toBe(6);
  });
  it('falls back to the pooled rate, or none', () => {
    expect(slopeAt([{ frequencyHz: 9e9, slopePpmPerYear: null }], 1.5, 9e9)).toBe(1.5);
    expect(slopeAt([], null, 9e9)).toBeNull();
  });
});

describe('budget of a reading taken now (JCGM 100:2008)', () => {
  const c = correctionAt(points, 9.5e9)!;
  it('combines the four lines by root sum of squares and expands with k = 2.00', () => {
    const b = useBudget(c, 6, 0.5);
    expect(b.correctionPpm).toBeCloseTo(-15, 12);
    expect(b.driftPpm).toBeCloseTo(3, 12);
    // Drift of 3 ppm as a rectangular bound: 3 / sqrt(3) = sqrt(3) (GUM 4.3.7).
    expect(b.lines.map((l) => l.uPpm)).toEqual([
      c.uPpm,
      c.uInterpolationPpm,
      c.uReadingPpm,
      3 / Math.sqrt(3),
    ]);
    const rss = Math.sqrt(4.5 ** 2 + 25 / 3 + (0.5 * Math.sqrt(7) + 2) ** 2 + 3);
    expect(b.combinedPpm).toBeCloseTo(rss, 12);
    expect(b.coverageFactor).toBeCloseTo(2.0, 2); // GUM Table G.2, p = 95.45 %, nu = infinity
    expect(b.expandedPpm).toBeCloseTo(b.coverageFactor * rss, 12);
    // The correction's own uncertainty: the check's and the interpolation's only.
    expect(b.uCorrectionPpm).toBeCloseTo(Math.hypot(4.5, 5 / Math.sqrt(3)), 12);
  });
  it('adds no drift line without a known rate', () => {
    const b = useBudget(c, null, 2);
    expect(b.driftPpm).toBe(0);
    expect(b.lines[3]!.uPpm).toBe(0);
  });
});
