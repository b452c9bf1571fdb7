// The solver's fused path (a problem that forms J'WJ and J'Wr itself, without storing J) against its
// stored-Jacobian path: the same problem both ways must give the same fit to the last bit, weighted
// or not, and refuse a start outside the model the same way. Self-consistency of lsq.ts, no outside
// source: the outside checks of the fits are in test/reference/resonance.test.ts.
import { describe, expect, it } from 'vitest';
import { levenbergMarquardt, LsqError, type LsqProblem } from '../../app/engine/lsq';
import { scalarProblem } from '../../app/engine/resonance';
import { gaussian } from '../fixtures/sweeps';

/** A Lorentzian dip on a sloped baseline, y = (c0 + c1 dx)(1 - A / (1 + (g dx)^2)), with noise. */
function dipData(n: number, seed: number): { x: Float64Array; y: Float64Array } {
  const next = gaussian(seed);
  const x = new Float64Array(n);
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const xi = -5 + (10 * i) / (n - 1);
    const dx = xi - 0.13;
    x[i] = xi;
    y[i] = (1 + 0.01 * dx) * (1 - 0.2 / (1 + (2.1 * dx) ** 2)) * (1 + 0.01 * next()) + 0.002 * next();
  }
  return { x, y };
}

/** The model both ways: `evaluate` with a stored Jacobian, and the fused form summing the same rows. */
function dipProblem(x: Float64Array, y: Float64Array, fused: boolean): LsqProblem {
  const n = x.length;
  const evaluate = (p: Float64Array, r: Float64Array, jac: Float64Array | null): boolean => {
    const [x0, g, a, c0, c1] = p as unknown as [number, number, number, number, number];
    if (!(g > 0) || !(a > 0) || !(a < 1) || !(c0 > 0)) return false;
    for (let i = 0; i < n; i++) {
      const dx = (x[i] as number) - x0;
      const u = g * dx;
      const l = 1 / (1 + u * u);
      const d = 1 - a * l;
      const b = c0 + c1 * dx;
      r[i] = (y[i] as number) - b * d;
      if (jac) {
        const q = 2 * b * a * l * l * u;
        jac.set([-c1 * d - q * g, q * dx, -b * l, d, dx * d], i * 5);
      }
    }
    return true;
  };
  const problem: LsqProblem = { rows: n, params: 5, evaluate };
  if (fused) {
    const jac = new Float64Array(n * 5);
    problem.normalEquations = (p, w, r, jtj, jtr) => {
      if (!evaluate(p, r, jac)) return null;
      jtj.fill(0);
      jtr.fill(0);
      let ssr = 0;
      // Row by row in the order of lsq.ts's own sums, so both paths round alike.
      for (let i = 0; i < n; i++) {
        const wi = w ? (w[i] as number) : 1;
        const ri = r[i] as number;
        ssr += wi * ri * ri;
        for (let a = 0; a < 5; a++) {
          const va = wi * (jac[i * 5 + a] as number);
          jtr[a] = (jtr[a] as number) + va * ri;
          for (let b = 0; b <= a; b++)
            jtj[a * 5 + b] = (jtj[a * 5 + b] as number) + va * (jac[i * 5 + b] as number);
        }
      }
      for (let a = 0; a < 5; a++) for (let b = a + 1; b < 5; b++) jtj[a * 5 + b] = jtj[b * 5 + a] as number;
      return ssr;
    };
  }
  return problem;
}

describe('levenbergMarquardt with a fused normal-equations problem', () => {
  const start = [0, 2, 0.3, 1, 0];

  for (const weighted of [false, true]) {
    it(`gives the stored-Jacobian path's fit to the last bit (${weighted ? 'weighted' : 'unweighted'})`, () => {
      const { x, y } = dipData(801, 7);
      const plain = dipProblem(x, y, false);
      const fused = dipProblem(x, y, true);
      if (weighted) {
        const w = Float64Array.from(y, (v) => 1 / (4e-6 + 1e-4 * v * v));
        plain.weights = w;
        fused.weights = w;
      }
      for (const options of [{}, { stepTolerance: 0.001 }]) {
        const a = levenbergMarquardt(plain, start, options);
        const b = levenbergMarquardt(fused, start, options);
        expect(b.iterations).toBeGreaterThan(1);
        expect(Array.from(b.params)).toEqual(Array.from(a.params));
        expect(Array.from(b.covariance)).toEqual(Array.from(a.covariance));
        expect(Array.from(b.residuals)).toEqual(Array.from(a.residuals));
        expect([b.ssr, b.iterations, b.converged]).toEqual([a.ssr, a.iterations, a.converged]);
      }
      // And it is a fit: the dip's centre and width come back near the values the data were made with.
      const fit = levenbergMarquardt(fused, start);
      expect(fit.params[0]).toBeCloseTo(0.13, 2);
      expect(Math.abs((fit.params[1] as number) / 2.1 - 1)).toBeLessThan(0.05);
    });
  }

  it('refuses a start outside the model on the fused path', () => {
    const { x, y } = dipData(101, 3);
    expect(() => levenbergMarquardt(dipProblem(x, y, true), [0, 2, 1.5, 1, 0])).toThrow(LsqError);
  });
});

describe('the scalar dip model of resonance.ts', () => {
  it("forms the same J'WJ, J'Wr and residuals in its one-pass method as from its own Jacobian", () => {
    const { x, y } = dipData(2001, 11);
    const problem = scalarProblem(x, y);
    const n = x.length;
    const w = Float64Array.from({ length: n }, (_, i) => 0.5 + ((i * 7919) % 101) / 100);
    // Away from the minimum, so every derivative and residual is well away from zero.
    const p = Float64Array.from([0.3, 1.7, 0.25, 1.02, 0.015]);
    for (const weights of [undefined, w]) {
      const r = new Float64Array(n);
      const jac = new Float64Array(n * 5);
      expect(problem.evaluate(p, r, jac)).toBe(true);
      const jtj = new Float64Array(25);
      const jtr = new Float64Array(5);
      let ssr = 0;
      for (let i = 0; i < n; i++) {
        const wi = weights ? (weights[i] as number) : 1;
        ssr += wi * (r[i] as number) ** 2;
        for (let a = 0; a < 5; a++) {
          jtr[a] = (jtr[a] as number) + wi * (jac[i * 5 + a] as number) * (r[i] as number);
          for (let b = 0; b < 5; b++)
            jtj[a * 5 + b] =
              (jtj[a * 5 + b] as number) + wi * (jac[i * 5 + a] as number) * (jac[i * 5 + b] as number);
        }
      }
      const r2 = new Float64Array(n);
      const jtj2 = new Float64Array(25);
      const jtr2 = new Float64Array(5);
      const ssr2 = problem.normalEquations?.(p, weights, r2, jtj2, jtr2);
      expect(ssr2).toBeCloseTo(ssr, 10);
      expect([...r2]).toEqual([...r]);
      for (let k = 0; k < 25; k++) expect(jtj2[k]).toBeCloseTo(jtj[k] as number, 8);
      for (let k = 0; k < 5; k++) expect(jtr2[k]).toBeCloseTo(jtr[k] as number, 10);
    }
    // Outside the model (a depth of 1 or more) both refuse.
    const outside = Float64Array.from([0.3, 1.7, 1.2, 1.02, 0.015]);
    expect(problem.evaluate(outside, new Float64Array(n), new Float64Array(n * 5))).toBe(false);
    expect(
      problem.normalEquations?.(
        outside,
        undefined,
        new Float64Array(n),
        new Float64Array(25),
        new Float64Array(5),
      ),
    ).toBeNull();
  });
});
