// The scalar dip fit of long traces (over 3,000 points: a thinned first fit, steps without J'WJ)
// against the same estimator computed the plain way: both Levenberg-Marquardt passes on every point
// run to rounding, no statistical stop. The shortcuts may move f0 and QL only by a small fraction of
// their standard uncertainties (measured: at most 3e-5 of u). Self-consistency, no outside source: the
// outside checks are in test/reference/resonance.test.ts.
import { describe, expect, it } from 'vitest';
import { levenbergMarquardt } from '../../app/engine/lsq';
import { fitScalarDip, scalarProblem } from '../../app/engine/resonance';
import { syntheticSweep } from '../fixtures/sweeps';

interface Start {
  f0Hz: number;
  widthHz: number;
  depth: number;
  baseline: number;
  slopePerHz: number;
}

/** fitScalarDip's estimator written out: unweighted fit, noise model s_a^2 + s_m^2 m^2 from its
 * squared residuals (least squares on m^2, a negative term dropped), weighted fit; both to rounding. */
function plainFit(frequencyHz: number[], power: number[], start: Start) {
  const fc = start.f0Hz;
  const s = start.widthHz;
  const x = Float64Array.from(frequencyHz, (f) => (f - fc) / s);
  const y = Float64Array.from(power, (p) => p / start.baseline);
  const n = x.length;
  const problem = scalarProblem(x, y);
  const first = levenbergMarquardt(problem, [0, 2, start.depth, 1, (start.slopePerHz * s) / start.baseline]);
  let s12 = 0;
  let s22 = 0;
  let t1 = 0;
  let t2 = 0;
  for (let i = 0; i < n; i++) {
    const e = first.residuals[i] as number;
    const m2 = ((y[i] as number) - e) ** 2;
    s12 += m2;
    s22 += m2 * m2;
    t1 += e * e;
    t2 += e * e * m2;
  }
  const det = n * s22 - s12 * s12;
  let va = (t1 * s22 - t2 * s12) / det;
  let vm = (n * t2 - s12 * t1) / det;
  if (va < 0) [va, vm] = [0, t1 / s12];
  if (vm < 0) [va, vm] = [t1 / n, 0];
  problem.weights = Float64Array.from(y, (v, i) => {
    const m = v - (first.residuals[i] as number);
    return 1 / (va + vm * m * m);
  });
  const fit = levenbergMarquardt(problem, first.params);
  const [x0, g] = fit.params as unknown as [number, number];
  const f0Hz = fc + s * x0;
  const cov = fit.covariance;
  const dQdx0 = g / 2;
  const dQdg = f0Hz / (2 * s);
  return {
    f0Hz,
    loadedQ: (g * f0Hz) / (2 * s),
    f0UncertaintyHz: s * Math.sqrt(cov[0] as number),
    loadedQUncertainty: Math.sqrt(
      dQdx0 * dQdx0 * (cov[0] as number) +
        2 * dQdx0 * dQdg * (cov[1] as number) +
        dQdg * dQdg * (cov[6] as number),
    ),
  };
}

describe('scalar dip fit of long traces against the plain fit run to rounding', () => {
  const f0Hz = 9.375e9;
  const loadedQ = 1500;
  const linewidthHz = f0Hz / loadedQ;
  const cases = [
    { points: 10001, depthDb: 1, noise: 1, seed: 1 },
    { points: 10001, depthDb: 1, noise: 1, seed: 8 },
    { points: 10001, depthDb: 2.5, noise: 1, seed: 3 },
    { points: 3001, depthDb: 1, noise: 3, seed: 21 },
    { points: 20001, depthDb: 2.5, noise: 5, seed: 22 },
  ];
  for (const c of cases) {
    it(`${c.points} points, ${c.depthDb} dB, noise x${c.noise}: f0 and QL within 1e-4 of their u`, () => {
      const truth = f0Hz + 0.13 * linewidthHz;
      const s = syntheticSweep([{ f0Hz: truth, loadedQ, depthDb: c.depthDb }], {
        startHz: f0Hz - 5 * linewidthHz,
        stopHz: f0Hz + 5 * linewidthHz,
        points: c.points,
        seed: c.seed,
        noise: c.noise,
      });
      const start = { f0Hz, widthHz: linewidthHz, depth: 0.3, baseline: s.power[0] as number, slopePerHz: 0 };
      const fit = fitScalarDip(s.frequencyHz, s.power, start);
      const plain = plainFit(s.frequencyHz, s.power, start);
      expect(Math.abs(fit.f0Hz - plain.f0Hz)).toBeLessThan(1e-4 * plain.f0UncertaintyHz);
      expect(Math.abs(fit.loadedQ - plain.loadedQ)).toBeLessThan(1e-4 * plain.loadedQUncertainty);
      expect(Math.abs(fit.f0UncertaintyHz / plain.f0UncertaintyHz - 1)).toBeLessThan(1e-4);
      expect(Math.abs(fit.loadedQUncertainty / plain.loadedQUncertainty - 1)).toBeLessThan(1e-4);
      // And it is a fit of the dip: f0 near the truth on the scale of its uncertainty.
      expect(Math.abs(fit.f0Hz - truth)).toBeLessThan(5 * fit.f0UncertaintyHz);
    });
  }
});

describe('fitScalarDip keeps its working arrays between calls', () => {
  it('gives each trace the same answer whatever was fitted before it, shorter or longer', () => {
    const f0Hz = 9.375e9;
    const linewidthHz = f0Hz / 1500;
    const sweep = (points: number, seed: number) =>
      syntheticSweep([{ f0Hz: f0Hz + 0.05 * linewidthHz, loadedQ: 1500, depthDb: 2.5 }], {
        startHz: f0Hz - 5 * linewidthHz,
        stopHz: f0Hz + 5 * linewidthHz,
        points,
        seed,
      });
    const startOf = (s: { power: number[] }) => ({
      f0Hz,
      widthHz: linewidthHz,
      depth: 0.3,
      baseline: s.power[0] as number,
      slopePerHz: 0,
    });
    const a = sweep(4001, 31);
    const b = sweep(10001, 32);
    const c = sweep(501, 33);
    const first = fitScalarDip(a.frequencyHz, a.power, startOf(a));
    // Longer, shorter and equal traces in between, then the first again: the same numbers to the bit.
    fitScalarDip(b.frequencyHz, b.power, startOf(b));
    fitScalarDip(c.frequencyHz, c.power, startOf(c));
    fitScalarDip(
      a.frequencyHz,
      a.power.map((p, i) => p * (1 + 0.01 * Math.sin(i))),
      startOf(a),
    );
    expect(fitScalarDip(a.frequencyHz, a.power, startOf(a))).toEqual(first);
    expect(fitScalarDip(c.frequencyHz, c.power, startOf(c)).pointsUsed).toBe(501);
  });
});
