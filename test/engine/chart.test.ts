// Divisions charts: Fritsch-Carlson monotone cubic interpolation, slope and inverse
// (F. N. Fritsch and R. E. Carlson, SIAM J. Numer. Anal. 17(2), 238-246, 1980).
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  ChartError,
  chartProblem,
  createChart,
  divisionsAtFrequency,
  frequencyAtDivisions,
  slopeHzPerDivision,
} from '../../app/engine/chart';
import type { ChartPoint } from '../../app/engine/model';

// A linear chart: 12 GHz at 0 div falling 80 MHz per division to 8 GHz at 50 div.
const linear: ChartPoint[] = [0, 10, 20, 30, 40, 50].map((d) => ({
  divisions: d,
  frequencyHz: 12e9 - 80e6 * d,
}));

// A cylindrical-cavity-like chart (f^2 = A + C/(d - d0)^2, the TE011 form in DESIGN.md 4), read
// at every division from 0 to 50: 7.75 GHz falling to 6.37 GHz, curving most at the start.
const cavityLaw = (d: number): number => Math.sqrt(4e19 + 2e21 / (d + 10) ** 2);
const cavity: ChartPoint[] = Array.from({ length: 51 }, (_, d) => ({
  divisions: d,
  frequencyHz: cavityLaw(d),
}));

describe('chart validation', () => {
  it('refuses fewer than 2 points', () => {
    expect(chartProblem([])).toContain('at least 2 points');
    expect(() => createChart([{ divisions: 1, frequencyHz: 9e9 }])).toThrow(ChartError);
    expect(chartProblem(undefined)).toContain('at least 2 points');
  });

  it('refuses a non-monotone chart and repeated divisions', () => {
    const turn = [
      { divisions: 0, frequencyHz: 9e9 },
      { divisions: 1, frequencyHz: 10e9 },
      { divisions: 2, frequencyHz: 9.5e9 },
    ];
    expect(chartProblem(turn)).toContain('not monotone');
    expect(() => createChart(turn)).toThrow(/not monotone/);
    expect(
      chartProblem([
        { divisions: 0, frequencyHz: 9e9 },
        { divisions: 0, frequencyHz: 9.1e9 },
      ]),
    ).toContain('two points at 0');
    expect(
      chartProblem([
        { divisions: 0, frequencyHz: 9e9 },
        { divisions: 1, frequencyHz: 9e9 },
      ]),
    ).toContain('strictly monotone');
  });

  it('sorts the points by divisions', () => {
    expect(frequencyAtDivisions([...linear].reverse(), 25)).toBeCloseTo(10e9, 3);
  });
});

describe('interpolation', () => {
  it('reproduces a straight line exactly, with its slope', () => {
    const chart = createChart(linear);
    expect(frequencyAtDivisions(chart, 33.75)).toBeCloseTo(9.3e9, 3);
    expect(slopeHzPerDivision(chart, 33.75)).toBeCloseTo(-80e6, 3);
    expect(slopeHzPerDivision(chart, 0)).toBeCloseTo(-80e6, 3);
  });

  it('passes through every knot', () => {
    const chart = createChart(cavity);
    for (const p of cavity) expect(frequencyAtDivisions(chart, p.divisions)).toBe(p.frequencyHz);
  });

  it('refuses readings outside the chart range and names them', () => {
    const chart = createChart(linear);
    expect(() => frequencyAtDivisions(chart, 50.01, 'readings[3]')).toThrow(
      "readings[3]: 50.01 divisions is outside the chart's range 0 to 50 divisions",
    );
    expect(() => frequencyAtDivisions(chart, -0.1)).toThrow(ChartError);
    expect(() => divisionsAtFrequency(chart, 12.1e9)).toThrow(/outside the chart's range/);
  });

  it('slope agrees with a finite difference of the interpolant', () => {
    const chart = createChart(cavity);
    for (const d of [0.5, 5, 9.9, 13, 47]) {
      const h = 1e-4;
      const fd = (frequencyAtDivisions(chart, d + h) - frequencyAtDivisions(chart, d - h)) / (2 * h);
      expect(slopeHzPerDivision(chart, d) / fd).toBeCloseTo(1, 5);
    }
  });

  it('stays within 2e-4 of the smooth cavity law between knots', () => {
    // Common practice: a chart's interpolation error should be small against the meter's 0.1 %
    // accuracy. The worst case here is the first division, where the law curves most.
    const chart = createChart(cavity);
    for (let d = 0; d <= 50; d += 0.37) {
      expect(Math.abs(frequencyAtDivisions(chart, d) / cavityLaw(d) - 1)).toBeLessThan(2e-4);
    }
  });

  it('reproduces a quadratic exactly (three-point initial tangents, no limiting needed)', () => {
    const q = (d: number) => 1e9 + 3e8 * d - 2e6 * d * d;
    const chart = createChart([0, 1, 3, 4, 7, 10].map((d) => ({ divisions: d, frequencyHz: q(d) })));
    for (const d of [0.5, 2, 5.5, 9]) expect(frequencyAtDivisions(chart, d)).toBeCloseTo(q(d), 3);
  });
});

// Random strictly monotone charts: increasing divisions, frequencies stepping one way.
const monotoneChart = fc
  .tuple(
    fc.array(
      fc.tuple(fc.double({ min: 0.1, max: 10, noNaN: true }), fc.double({ min: 1e6, max: 5e8, noNaN: true })),
      { minLength: 2, maxLength: 12 },
    ),
    fc.boolean(),
    fc.double({ min: 1e9, max: 5e10, noNaN: true }),
  )
  .map(([steps, rising, startHz]) => {
    let d = 0;
    let f = startHz;
    const points: ChartPoint[] = [{ divisions: d, frequencyHz: f }];
    for (const [dd, df] of steps) {
      d += dd;
      f += rising ? df : -df;
      points.push({ divisions: d, frequencyHz: Math.max(f, 1) });
    }
    return points;
  })
  .filter((points) => chartProblem(points) === null);

describe('properties (fast-check)', () => {
  it('the interpolant is monotone between and across knots (Fritsch-Carlson 1980)', () => {
    fc.assert(
      fc.property(monotoneChart, (points) => {
        const chart = createChart(points);
        const first = chart.divisions[0] as number;
        const last = chart.divisions[chart.divisions.length - 1] as number;
        let previous = frequencyAtDivisions(chart, first);
        for (let i = 1; i <= 400; i++) {
          const f = frequencyAtDivisions(chart, Math.min(last, first + ((last - first) * i) / 400));
          if (chart.increasing ? f < previous - 1e-6 : f > previous + 1e-6) return false;
          previous = f;
        }
        return true;
      }),
      { numRuns: 200 },
    );
  });

  it('slope never has the wrong sign', () => {
    fc.assert(
      fc.property(monotoneChart, fc.double({ min: 0, max: 1, noNaN: true }), (points, s) => {
        const chart = createChart(points);
        const first = chart.divisions[0] as number;
        const last = chart.divisions[chart.divisions.length - 1] as number;
        const slope = slopeHzPerDivision(chart, Math.min(last, first + s * (last - first)));
        return chart.increasing ? slope >= -1e-6 : slope <= 1e-6;
      }),
    );
  });

  it('inverse round-trips: divisionsAtFrequency(frequencyAtDivisions(d)) = d', () => {
    fc.assert(
      fc.property(monotoneChart, fc.double({ min: 0, max: 1, noNaN: true }), (points, s) => {
        const chart = createChart(points);
        const first = chart.divisions[0] as number;
        const last = chart.divisions[chart.divisions.length - 1] as number;
        const d = Math.min(last, first + s * (last - first));
        const f = frequencyAtDivisions(chart, d);
        const back = divisionsAtFrequency(chart, f);
        // Where the curve is flat in frequency, d is fixed only to the frequency resolution.
        return (
          Math.abs(frequencyAtDivisions(chart, back) - f) <= 1e-6 * Math.abs(f) * 1e-6 ||
          Math.abs(back - d) < 1e-9
        );
      }),
      { numRuns: 300 },
    );
  });
});
