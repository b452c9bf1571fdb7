// The history engine's rules on small invented series worked by hand: weighted prediction, exit
// through either limit, the step rule over several frequencies, pooled drift, and the health flags.
// Sources beside each check: NIST/SEMATECH e-Handbook 4.4.3 / 4.5.1.2 (line fit, prediction), or
// this product's stated thresholds (common practice).
import { describe, expect, it } from 'vitest';
import {
  DIP_FADE_FRACTION,
  Q_FALL_FRACTION,
  analyseDrift,
  analyseHealth,
  fitLine,
  pooledDrift,
  predict,
  projectedExit,
  type HistoryCheck,
} from '../../app/engine/drift';
import { tQuantile } from '../../app/engine/distributions';

/** Points on y = a + b x at x = 0..4 with standard uncertainty u. */
const line = (a: number, b: number, u?: number) =>
  [0, 1, 2, 3, 4].map((x) => (u === undefined ? { x, y: a + b * x } : { x, y: a + b * x, u }));

describe('straight-line fit (e-Handbook 4.4.3; weighted 4.4.3.2)', () => {
  it('an exact line: slope, intercept, zero scatter, means and sums for the prediction', () => {
    const f = fitLine(line(3, 2));
    expect(f.slope).toBeCloseTo(2, 14);
    expect(f.intercept).toBeCloseTo(3, 14);
    expect(f.residualSd).toBeCloseTo(0, 14);
    expect(f.n).toBe(5);
    expect(f.dof).toBe(3);
    expect(f.xMean).toBe(2);
    expect(f.sumWeights).toBe(5);
    expect(f.sxx).toBe(10);
    expect(f.weighted).toBe(false);
    expect(f.birgeRatio).toBe(null);
  });

  it('scatter: s^2 = SSR/(n - 2), u(b) = s/sqrt(Sxx), u(a) = s sqrt(1/n + xbar^2/Sxx), cov = -s^2 xbar/Sxx', () => {
    // Residuals +1, -1, 0, -1, +1 about y = x (by hand: slope 1, intercept 0 stay the same).
    const pts = [0, 1, 2, 3, 4].map((x, i) => ({ x, y: x + [1, -1, 0, -1, 1][i]! }));
    const f = fitLine(pts);
    const s2 = 4 / 3;
    expect(f.slope).toBeCloseTo(1, 14);
    expect(f.intercept).toBeCloseTo(0, 14);
    expect(f.residualSd).toBeCloseTo(Math.sqrt(s2), 14);
    expect(f.unitVariance).toBeCloseTo(s2, 14);
    expect(f.uSlope).toBeCloseTo(Math.sqrt(s2 / 10), 14);
    expect(f.uIntercept).toBeCloseTo(Math.sqrt(s2 * (1 / 5 + 4 / 10)), 14);
    expect(f.covInterceptSlope).toBeCloseTo((-s2 * 2) / 10, 14);
  });

  it('weighted with stated u: Birge ratio from the weighted residuals, never better than the stated u', () => {
    const pts = [0, 1, 2, 3, 4].map((x, i) => ({ x, y: x + [1, -1, 0, -1, 1][i]!, u: 2 }));
    const residual = fitLine(pts, 'residual');
    const stated = fitLine(pts, 'residual-or-stated');
    // chi^2 = 4/4 = 1 over 3 dof: Birge ratio sqrt(1/3) < 1, so the stated u sets the scale.
    expect(residual.birgeRatio as number).toBeCloseTo(Math.sqrt(1 / 3), 14);
    expect(residual.unitVariance).toBeCloseTo(1 / 3, 14);
    expect(stated.unitVariance).toBe(1);
    expect(stated.uSlope).toBeCloseTo(Math.sqrt(1 / 2.5), 14);
    expect(stated.weighted).toBe(true);
    expect(stated.sumWeights).toBe(1.25);
  });

  it('an unweighted fit has no stated u: its scatter sets the scale whatever scale was asked for', () => {
    const pts = [0, 1, 2, 3, 4].map((x, i) => ({ x, y: x + 0.1 * [1, -1, 0, -1, 1][i]! }));
    expect(fitLine(pts, 'residual-or-stated').unitVariance).toBeCloseTo(0.04 / 3, 14);
  });

  it('refuses mixed, non-positive or infinite point uncertainties, non-finite points and a single x', () => {
    expect(() =>
      fitLine([
        { x: 0, y: 0, u: 1 },
        { x: 1, y: 1 },
        { x: 2, y: 2 },
      ]),
    ).toThrow('either every point or no point carries an uncertainty');
    for (const u of [0, -1, Infinity]) {
      expect(() => fitLine(line(0, 1, u))).toThrow(`point uncertainty must be positive (got ${u})`);
    }
    expect(() => fitLine([...line(0, 1), { x: NaN, y: 1 }])).toThrow('fit points must be finite');
    expect(() => fitLine([...line(0, 1), { x: 1, y: Infinity }])).toThrow('fit points must be finite');
    expect(() => fitLine([0, 1, 2].map((y) => ({ x: 5, y })))).toThrow(
      'a straight-line fit needs at least two distinct x values',
    );
    expect(fitLine(line(0, 1).slice(0, 3)).n).toBe(3);
  });
});

describe('prediction of a single new observation (e-Handbook 4.5.1.2)', () => {
  // Weighted exact line, u = 2 at x = 0..4, stated scale: s^2 = 1, sum w = 1.25, xbar = 2,
  // Sxx = 0.25 x 10 = 2.5. At x0 = 2, sigma_f^2 = 1/1.25 = 0.8.
  it('a weighted fit takes the new observation at its own u, or at the mean weight when not given', () => {
    const f = fitLine(line(1, 3, 2), 'residual-or-stated');
    const own = predict(f, 2, 0.95, 3);
    expect(own.value).toBeCloseTo(7, 12);
    expect(own.sdMean).toBeCloseTo(Math.sqrt(0.8), 12);
    expect(own.sdPrediction).toBeCloseTo(Math.sqrt(0.8 + 9), 12);
    const meanWeight = predict(f, 2, 0.95);
    expect(meanWeight.sdPrediction).toBeCloseTo(Math.sqrt(0.8 + 4), 12);
    // Away from the mean: sigma_f^2 = 1/1.25 + (6 - 2)^2 / 2.5.
    expect(predict(f, 6, 0.95, 3).sdMean).toBeCloseTo(Math.sqrt(0.8 + 6.4), 12);
    expect(own.k).toBeCloseTo(tQuantile(0.975, 3), 12);
    expect(own.halfWidth).toBeCloseTo(own.k * own.sdPrediction, 12);
    expect(own.coverage).toBe(0.95);
  });

  it('an unweighted fit ignores a new observation u (its scatter is the residual SD)', () => {
    const pts = [0, 1, 2, 3, 4].map((x, i) => ({ x, y: x + [1, -1, 0, -1, 1][i]! }));
    const f = fitLine(pts);
    expect(predict(f, 2, 0.95, 100).sdPrediction).toBeCloseTo(Math.sqrt((4 / 3) * (1 + 1 / 5)), 12);
  });

  it('refuses a coverage outside (0, 1)', () => {
    const f = fitLine(line(0, 1));
    for (const c of [0, 1, NaN])
      expect(() => predict(f, 0, c)).toThrow(`coverage must lie between 0 and 1 (got ${c})`);
    expect(predict(f, 0, 0.6827).coverage).toBe(0.6827);
  });
});

describe('projected exit from the tolerance (band y +- k sigma_p against +-T; common practice)', () => {
  const noisy = (b: number) =>
    fitLine([0, 1, 2, 3, 4].map((x, i) => ({ x, y: b * x + [1, -1, 0, -1, 1][i]! })));

  it('a meter drifting down leaves through the lower limit, where the band meets -T', () => {
    const f = noisy(-10);
    const exit = projectedExit(f, 4, 100) as number;
    expect(exit).toBeGreaterThan(4);
    const p = predict(f, exit);
    expect(p.value - p.halfWidth).toBeCloseTo(-100, 6);
    const before = predict(f, exit - 0.01);
    expect(before.value - before.halfWidth).toBeGreaterThan(-100);
  });

  it('drifting up: the band meets +T', () => {
    const f = noisy(10);
    const exit = projectedExit(f, 4, 100) as number;
    const p = predict(f, exit);
    expect(p.value + p.halfWidth).toBeCloseTo(100, 6);
  });

  it('already outside gives the starting point; inside over the whole horizon gives null', () => {
    const f = noisy(10);
    expect(projectedExit(f, 20, 100)).toBe(20);
    expect(projectedExit(noisy(0.01), 4, 1000)).toBe(null);
    // The horizon defaults to 30 (years) from the start: a crossing near t = 38.6 is found only
    // when a longer horizon is asked for.
    const slow = noisy(2);
    expect(projectedExit(slow, 4, 120)).toBe(null);
    expect(projectedExit(slow, 4, 120, { horizon: 60 }) as number).toBeCloseTo(38.62, 1);
  });

  it('a wider coverage leaves earlier', () => {
    const f = noisy(10);
    expect(projectedExit(f, 4, 100, { coverage: 0.99 }) as number).toBeLessThan(
      projectedExit(f, 4, 100) as number,
    );
  });
});

/** Checks at t = 0, 1, ... with as-found errors per frequency (one row per check). */
function history(
  rows: number[][],
  frequencies: number[],
  opts: { u?: number; tolerance?: number } = {},
): HistoryCheck[] {
  return rows.map((errors, t) => ({
    tYears: t,
    adjusted: false,
    points: frequencies.map((f, j) => ({
      frequencyHz: f,
      phase: 'as-found' as const,
      errorPpm: errors[j] as number,
      uPpm: opts.u ?? 2,
      tolerancePpm: opts.tolerance ?? 500,
    })),
  }));
}

describe('steps: a move beyond the 99.73 % prediction at no fewer than half the frequencies', () => {
  // The step rule is this product's stated choice (common practice; drift.ts names it).
  const flat = [0, 1, -1, 0];
  const rowsWith = (moved: number[], count: number) => [
    ...flat.map((e) => Array<number>(count).fill(e)),
    Array.from({ length: count }, (_, j) => (moved.includes(j) ? 300 : 0)),
  ];

  it('one of three frequencies moved is a misreading, two of three a step', () => {
    const f = [9e9, 1e10, 1.1e10];
    const one = analyseDrift(history(rowsWith([0], 3), f));
    const last = one.steps[one.steps.length - 1]!;
    expect(last.flaggedCount).toBe(1);
    expect(last.isStep).toBe(false);
    expect(one.currentSegment).toBe(0);
    const two = analyseDrift(history(rowsWith([0, 2], 3), f));
    const found = two.steps[two.steps.length - 1]!;
    expect(found.flaggedCount).toBe(2);
    expect(found.isStep).toBe(true);
    expect(found.checkIndex).toBe(4);
    expect(found.tYears).toBe(4);
    expect(two.currentSegment).toBe(1);
    expect(two.segmentStartYears).toBe(4);
  });

  it('one of two frequencies moved is half, hence a step', () => {
    const a = analyseDrift(history(rowsWith([1], 2), [9e9, 1e10]));
    expect(a.steps[a.steps.length - 1]?.isStep).toBe(true);
  });

  it('each test states the observation, the prediction and the limit it was judged by', () => {
    const a = analyseDrift(history(rowsWith([0], 1), [9e9]));
    const test = a.steps[a.steps.length - 1]!.tests[0]!;
    expect(test.frequencyHz).toBe(9e9);
    expect(test.observedPpm).toBe(300);
    expect(test.basis).toBe('prediction');
    expect(test.flagged).toBe(Math.abs(test.observedPpm - test.predictedPpm) > test.limitPpm);
    expect(test.flagged).toBe(true);
    expect(test.limitPpm).toBeGreaterThan(0);
    expect(Math.abs(test.predictedPpm)).toBeLessThan(5);
  });

  it('tests a check only after three earlier checks in its segment', () => {
    const a = analyseDrift(history([[0], [1], [-1], [0], [0]], [9e9]));
    expect(a.steps.map((s) => s.checkIndex)).toEqual([3, 4]);
  });
});

describe('segments and fits per frequency', () => {
  it('an adjustment opens a segment at the as-left points; fits need three points there', () => {
    const checks = history([[50], [60], [70], [80]], [1e10]);
    checks[3] = {
      ...checks[3]!,
      adjusted: true,
      points: [...checks[3]!.points, { ...checks[3]!.points[0]!, phase: 'as-left', errorPpm: 0, uPpm: 3 }],
    };
    const a = analyseDrift(checks);
    expect(a.currentSegment).toBe(1);
    expect(a.segmentStartYears).toBe(3);
    const f = a.frequencies[0]!;
    expect(f.fit).toBe(null);
    expect(f.uNewPpm).toBe(3);
    expect(f.tolerancePpm).toBe(500);
    expect(f.observations.map((o) => o.segment)).toEqual([0, 0, 0, 0, 1]);
    expect(a.pooled).toBe(null);
  });

  it('orders frequencies, keeps the newest tolerance, and fits the current segment', () => {
    const checks = history(
      [
        [1, 2],
        [2, 4],
        [3, 6],
      ],
      [1e10, 9e9],
    );
    checks[2]!.points = checks[2]!.points.map((p) => ({ ...p, tolerancePpm: 400 }));
    const a = analyseDrift(checks, 'residual');
    expect(a.frequencies.map((f) => f.frequencyHz)).toEqual([9e9, 1e10]);
    expect(a.frequencies[0]!.tolerancePpm).toBe(400);
    expect(a.frequencies[0]!.fit?.slope).toBeCloseTo(2, 12);
    expect(a.frequencies[1]!.fit?.slope).toBeCloseTo(1, 12);
    expect(a.segmentStartYears).toBe(0);
  });

  it('checks at the same time are in order; at a single time they give no line and no step test', () => {
    const same = history([[0], [1], [2], [3]], [1e10]).map((c) => ({ ...c, tYears: 2 }));
    const a = analyseDrift(same);
    expect(a.steps).toEqual([]);
    expect(a.frequencies[0]!.fit).toBe(null);
    expect(a.pooled).toBe(null);
  });

  it('no checks: nothing to fit', () => {
    const a = analyseDrift([]);
    expect(a).toEqual({
      frequencies: [],
      steps: [],
      segmentStartYears: null,
      currentSegment: 0,
      pooled: null,
    });
  });
});

describe('pooled drift: one drift common to the band, an offset per frequency', () => {
  it('two frequencies on parallel lines: drift 5 ppm/year, offsets 10 and 20 ppm', () => {
    const p = pooledDrift(
      [
        { frequencyHz: 9e9, points: line(10, 5) },
        { frequencyHz: 1e10, points: line(20, 5) },
      ],
      'residual',
    )!;
    expect(p.driftPpmPerYear).toBeCloseTo(5, 12);
    expect(p.offsets.map((o) => o.frequencyHz)).toEqual([9e9, 1e10]);
    expect(p.offsets[0]!.offsetPpm).toBeCloseTo(10, 12);
    expect(p.offsets[1]!.offsetPpm).toBeCloseTo(20, 12);
    expect(p.n).toBe(10);
    expect(p.frequencies).toBe(2);
    expect(p.dof).toBe(7);
    expect(p.residualSdPpm).toBeCloseTo(0, 12);
    expect(p.uDriftPpmPerYear).toBeCloseTo(0, 12);
  });

  it('u(drift) = sqrt(s^2 / Sxx) over the centred sums; with stated u never below what they imply', () => {
    // Residuals +1, -1, 0, -1, +1 at each of two frequencies: SSR = 8, dof = 10 - 2 - 1 = 7,
    // Sxx = 2 x 10 = 20 (unweighted).
    const bumpy = (a: number) => [0, 1, 2, 3, 4].map((x, i) => ({ x, y: a + 5 * x + [1, -1, 0, -1, 1][i]! }));
    const p = pooledDrift([
      { frequencyHz: 1, points: bumpy(0) },
      { frequencyHz: 2, points: bumpy(7) },
    ])!;
    expect(p.residualSdPpm).toBeCloseTo(Math.sqrt(8 / 7), 12);
    expect(p.uDriftPpmPerYear).toBeCloseTo(Math.sqrt(8 / 7 / 20), 12);
    // Stated u = 10 ppm: chi^2/dof = 0.08/7 < 1, so s^2 = 1 in units of the weights (Sxx = 20/100).
    const stated = pooledDrift([
      { frequencyHz: 1, points: bumpy(0).map((q) => ({ ...q, u: 10 })) },
      { frequencyHz: 2, points: bumpy(7).map((q) => ({ ...q, u: 10 })) },
    ])!;
    expect(stated.uDriftPpmPerYear).toBeCloseTo(Math.sqrt(1 / 0.2), 12);
    expect(stated.driftPpmPerYear).toBeCloseTo(5, 12);
  });

  it('without stated u the residual scale applies, even when the scatter is small', () => {
    const small = (a: number) =>
      [0, 1, 2, 3, 4].map((x, i) => ({ x, y: a + 5 * x + 0.1 * [1, -1, 0, -1, 1][i]! }));
    const p = pooledDrift([
      { frequencyHz: 1, points: small(0) },
      { frequencyHz: 2, points: small(7) },
    ])!;
    expect(p.uDriftPpmPerYear).toBeCloseTo(Math.sqrt(0.08 / 7 / 20), 12);
  });

  it('weights each point by 1/u^2', () => {
    // One frequency: the point at x = 4 is far off but carries a huge u, so the line follows the rest.
    const pts = [...line(0, 1, 1).slice(0, 4), { x: 4, y: 100, u: 1e6 }];
    expect(pooledDrift([{ frequencyHz: 1, points: pts }])!.driftPpmPerYear).toBeCloseTo(1, 6);
  });

  it('needs two points at a frequency, one residual degree of freedom and a spread in time', () => {
    expect(pooledDrift([{ frequencyHz: 1, points: line(0, 1).slice(0, 2) }])).toBe(null);
    const p = pooledDrift([
      { frequencyHz: 1, points: line(0, 1).slice(0, 3) },
      { frequencyHz: 2, points: line(0, 1).slice(0, 1) },
    ])!;
    expect(p.frequencies).toBe(1);
    expect(p.dof).toBe(1);
    expect(pooledDrift([{ frequencyHz: 1, points: [0, 1, 2].map((y) => ({ x: 3, y })) }])).toBe(null);
    expect(pooledDrift([])).toBe(null);
  });
});

describe('health of the resonance (thresholds are this product choice: common practice)', () => {
  const checks = (depths: number[], q: number[][] = [], spurious?: number[]) =>
    depths.map((d, i) => ({
      tYears: i,
      dipDepthsDb: Number.isNaN(d) ? [] : [d + 0.5, d],
      loadedQ: q[i] ?? [],
      ...(spurious ? { spuriousCount: spurious[i] } : {}),
    }));

  it('takes the shallowest dip of each check and fits the depth over time', () => {
    const h = analyseHealth(checks([4, 3, 2]), 1);
    expect(h.dip).toEqual([
      { tYears: 0, minDb: 4 },
      { tYears: 1, minDb: 3 },
      { tYears: 2, minDb: 2 },
    ]);
    expect(h.dipFit?.slope).toBeCloseTo(-1, 12);
    expect(h.newestDipDb).toBe(2);
    // Falls 1 dB a year from 4 dB: reaches the 1 dB minimum at t = 3.
    expect(h.dipReachesMinimumYears as number).toBeCloseTo(3, 12);
    // Fitted fall from 4 to 2 dB: half.
    expect(h.dipFallFraction as number).toBeCloseTo(0.5, 12);
    expect(h.fading).toBe(true);
  });

  it('a dip fading by exactly the threshold is flagged; two checks use the recorded depths', () => {
    const h = analyseHealth(checks([10, NaN, 10 * (1 - DIP_FADE_FRACTION)]), 1);
    expect(h.dipFit).toBe(null);
    expect(h.dipFallFraction as number).toBeCloseTo(DIP_FADE_FRACTION, 12);
    expect(h.fading).toBe(true);
    expect(analyseHealth(checks([10, 7.5]), 1).fading).toBe(false);
    expect(analyseHealth(checks([4]), 1).dipFallFraction).toBe(null);
    // No dip at the first check (0 dB): a fraction of nothing is not defined.
    expect(analyseHealth(checks([0, 0]), 1).dipFallFraction).toBe(null);
  });

  it('a rising or steady dip has no date of reaching the minimum; below the minimum is flagged', () => {
    expect(analyseHealth(checks([2, 3, 4]), 1).dipReachesMinimumYears).toBe(null);
    expect(analyseHealth(checks([4, 4, 4]), 1).dipReachesMinimumYears).toBe(null);
    expect(analyseHealth(checks([4, 4, 0.9]), 1).belowMinimum).toBe(true);
    expect(analyseHealth(checks([4, 4, 1]), 1).belowMinimum).toBe(false);
    const none = analyseHealth([], 1);
    expect(none.belowMinimum).toBe(false);
    expect(none.newestDipDb).toBe(null);
    expect(none.spurious).toBe(false);
  });

  it('loaded Q: the mean of each check, falling when down by the threshold or more', () => {
    const q = [[10000, 12000], [], [8800]];
    const h = analyseHealth(checks([4, 4, 4], q), 1);
    expect(h.q).toEqual([
      { tYears: 0, meanQ: 11000 },
      { tYears: 2, meanQ: 8800 },
    ]);
    expect(h.qFallFraction as number).toBeCloseTo(Q_FALL_FRACTION, 12);
    expect(h.qFalling).toBe(true);
    expect(analyseHealth(checks([4, 4], [[10000], [8100]]), 1).qFalling).toBe(false);
    expect(analyseHealth(checks([4], [[10000]]), 1).qFallFraction).toBe(null);
  });

  it('spurious responses at the newest check are flagged, earlier ones are not', () => {
    expect(analyseHealth(checks([4, 4], [], [0, 1]), 1).spurious).toBe(true);
    expect(analyseHealth(checks([4, 4], [], [2, 0]), 1).spurious).toBe(false);
  });
});
