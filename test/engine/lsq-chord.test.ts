// The solver's passes without J'WJ (lsq.ts): the scalar dip model's gradient pass against its fused
// normal-equations pass, chordMinimum (steps with one fixed normal matrix) and levenbergMarquardt's
// startNormalMatrix option against plain Levenberg-Marquardt on the same data; and the caller's
// residual arrays (the buffers option), which must change nothing but where the residuals live. Self-consistency of
// lsq.ts and resonance.ts, no outside source: the outside checks of the fits are in
// test/reference/resonance.test.ts.
import { describe, expect, it } from 'vitest';
import { chordMinimum, levenbergMarquardt, LsqError, type LsqProblem } from '../../app/engine/lsq';
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

const START = [0, 2, 0.3, 1, 0];

/** J'WJ of `problem` at p (exact, every row). */
function normalMatrixAt(problem: LsqProblem, p: Float64Array): Float64Array {
  const jtj = new Float64Array(25);
  problem.normalEquations?.(p, problem.weights, new Float64Array(problem.rows), jtj, new Float64Array(5));
  return jtj;
}

/** How far a is from b in standard uncertainties of the fit whose J'WJ and s^2 are given: the
 * largest move of any combination of parameters, sqrt(d' J'WJ d / s^2). */
function distanceInU(a: Float64Array, b: Float64Array, jtj: Float64Array, s2: number): number {
  let q = 0;
  for (let i = 0; i < 5; i++)
    for (let j = 0; j < 5; j++)
      q +=
        ((a[i] as number) - (b[i] as number)) *
        (jtj[i * 5 + j] as number) *
        ((a[j] as number) - (b[j] as number));
  return Math.sqrt(q / s2);
}

function scaled(m: Float64Array, k: number): Float64Array {
  return m.map((v) => v * k);
}

describe('the scalar dip model: gradient pass', () => {
  it("gives the residuals, J'Wr and SSR of its normal-equations pass to the last bit", () => {
    const { x, y } = dipData(2001, 11);
    const problem = scalarProblem(x, y);
    const n = x.length;
    const w = Float64Array.from({ length: n }, (_, i) => 0.5 + ((i * 7919) % 101) / 100);
    const p = Float64Array.from([0.3, 1.7, 0.25, 1.02, 0.015]);
    for (const weights of [undefined, w]) {
      const r1 = new Float64Array(n);
      const jtr1 = new Float64Array(5);
      const ssr1 = problem.normalEquations?.(p, weights, r1, new Float64Array(25), jtr1);
      const r2 = new Float64Array(n);
      const jtr2 = new Float64Array(5);
      const ssr2 = problem.gradient?.(p, weights, r2, jtr2);
      expect(typeof ssr2).toBe('number');
      expect(ssr2).toBe(ssr1);
      expect([...jtr2]).toEqual([...jtr1]);
      expect([...r2]).toEqual([...r1]);
      // And it is J'Wr: the gradient pass moves with p as the residuals do.
      expect(Math.abs(jtr2[0] as number)).toBeGreaterThan(0);
    }
    const outside = Float64Array.from([0.3, 1.7, 1.2, 1.02, 0.015]);
    expect(problem.gradient?.(outside, undefined, new Float64Array(n), new Float64Array(5))).toBeNull();
  });
});

describe('chordMinimum (steps with one fixed normal matrix)', () => {
  const { x, y } = dipData(4001, 5);
  const problem = scalarProblem(x, y);
  const exact = levenbergMarquardt(problem, START);
  const jtjAtMinimum = normalMatrixAt(problem, exact.params);
  // A start 30 standard uncertainties of f0 (x0) away from the minimum, and J'WJ there from every
  // tenth row, scaled to all of them (as resonance.ts does for long traces).
  const uX0 = Math.sqrt(exact.covariance[0] as number);
  const start = Float64Array.from(exact.params);
  start[0] = (start[0] as number) + 30 * uX0;
  const thinRows = (n: number) => Array.from({ length: Math.ceil(n / 10) }, (_, i) => i * 10);
  const idx = thinRows(x.length);
  const thin = scalarProblem(
    Float64Array.from(idx, (i) => x[i] as number),
    Float64Array.from(idx, (i) => y[i] as number),
  );
  const approx = scaled(normalMatrixAt(thin, start), x.length / idx.length);

  it('reaches the minimum of Levenberg-Marquardt run to rounding, within the step tolerance', () => {
    // The subset's matrix is close to the whole trace's, but not equal to it.
    const diagonalError = Math.abs((approx[0] as number) / (jtjAtMinimum[0] as number) - 1);
    expect(diagonalError).toBeGreaterThan(1e-6);
    expect(diagonalError).toBeLessThan(0.02);
    for (const stepTolerance of [0.1, 0.001]) {
      const chord = chordMinimum(problem, start, approx, { stepTolerance });
      expect(chord).not.toBeNull();
      if (!chord) return;
      expect(chord.iterations).toBeGreaterThan(1);
      expect(distanceInU(chord.params, exact.params, jtjAtMinimum, exact.residualVariance)).toBeLessThan(
        stepTolerance,
      );
      // Its residuals are the model's at its parameters, and its SSR is their sum of squares.
      const r = new Float64Array(x.length);
      expect(problem.evaluate(chord.params, r, null)).toBe(true);
      expect([...chord.residuals]).toEqual([...r]);
      expect(chord.ssr).toBe(r.reduce((s, v) => s + v * v, 0));
    }
  });

  it('gives up (null) when the matrix is not positive definite, a step raises the SSR, or too few steps', () => {
    expect(chordMinimum(problem, start, new Float64Array(25), { stepTolerance: 0.1 })).toBeNull();
    // A matrix a million times too small: the first step goes far beyond the minimum.
    expect(chordMinimum(problem, start, scaled(approx, 1e-6), { stepTolerance: 0.1 })).toBeNull();
    // Three times too large: each step covers a third of the way, so one step cannot stop.
    expect(
      chordMinimum(problem, start, scaled(approx, 3), { stepTolerance: 0.1, maxIterations: 1 }),
    ).toBeNull();
    expect(
      chordMinimum(problem, start, scaled(approx, 3), { stepTolerance: 0.1, maxIterations: 60 }),
    ).not.toBeNull();
  });

  it('needs a problem with a gradient pass', () => {
    const plain: LsqProblem = { rows: problem.rows, params: 5, evaluate: problem.evaluate.bind(problem) };
    expect(() => chordMinimum(plain, start, approx, { stepTolerance: 0.1 })).toThrow(LsqError);
  });
});

describe('levenbergMarquardt with startNormalMatrix', () => {
  const { x, y } = dipData(3001, 9);
  const problem = scalarProblem(x, y);
  problem.weights = Float64Array.from(y, (v) => 1 / (4e-6 + 1e-4 * v * v));
  const plain = levenbergMarquardt(problem, START);
  const jtjAtStart = normalMatrixAt(problem, Float64Array.from(START));

  it('reaches the same minimum and covariance as without it, however rough the matrix', () => {
    for (const factor of [1, 0.5, 2]) {
      const fit = levenbergMarquardt(problem, START, { startNormalMatrix: scaled(jtjAtStart, factor) });
      expect(fit.converged).toBe(true);
      for (let k = 0; k < 5; k++) {
        const u = Math.sqrt(plain.covariance[k * 6] as number);
        expect(Math.abs((fit.params[k] as number) - (plain.params[k] as number))).toBeLessThan(1e-6 * u);
      }
      for (let i = 0; i < 5; i++)
        for (let j = 0; j < 5; j++) {
          const scale = Math.sqrt((plain.covariance[i * 6] as number) * (plain.covariance[j * 6] as number));
          const diff = (fit.covariance[i * 5 + j] as number) - (plain.covariance[i * 5 + j] as number);
          expect(Math.abs(diff)).toBeLessThan(1e-8 * scale);
        }
    }
  });

  it('lets neither the statistical stop nor the covariance use the given matrix', () => {
    const atMinimum = Float64Array.from(plain.params);
    const jtjAtMinimum = normalMatrixAt(problem, atMinimum);
    const wrong = scaled(jtjAtMinimum, 100);
    // A start 0.05 standard uncertainties from the minimum: tested with a matrix 100 times too large,
    // its step would measure 0.005 and pass a stop of 0.01 at once, leaving the answer 0.05 away.
    const start = Float64Array.from(atMinimum);
    start[0] = (start[0] as number) + 0.05 * Math.sqrt(plain.residualVariance / (jtjAtMinimum[0] as number));
    expect(distanceInU(start, atMinimum, jtjAtMinimum, plain.residualVariance)).toBeCloseTo(0.05, 3);
    const fit = levenbergMarquardt(problem, start, { stepTolerance: 0.01, startNormalMatrix: wrong });
    expect(distanceInU(fit.params, atMinimum, jtjAtMinimum, plain.residualVariance)).toBeLessThan(0.01);
    // Nor the covariance, which would be 100 times too small.
    expect((fit.covariance[0] as number) / (plain.covariance[0] as number)).toBeCloseTo(1, 4);
    // With no step at all, the covariance is the exact one at the start, to the last bit.
    const none = levenbergMarquardt(problem, atMinimum, { maxIterations: 0, startNormalMatrix: wrong });
    const noneExact = levenbergMarquardt(problem, atMinimum, { maxIterations: 0 });
    expect([...none.covariance]).toEqual([...noneExact.covariance]);
  });

  it('is ignored for a problem without a gradient pass', () => {
    const noGradient: LsqProblem = { ...problem, gradient: undefined };
    const a = levenbergMarquardt(noGradient, START, { stepTolerance: 0.001 });
    const b = levenbergMarquardt(noGradient, START, {
      stepTolerance: 0.001,
      startNormalMatrix: scaled(jtjAtStart, 100),
    });
    expect([...b.params]).toEqual([...a.params]);
    expect([...b.covariance]).toEqual([...a.covariance]);
  });
});

describe('residual arrays given by the caller (buffers)', () => {
  const { x, y } = dipData(3001, 4);
  const problem = scalarProblem(x, y);
  const n = x.length;
  /** Two arrays full of numbers left from other work: every one must be written before it is read. */
  const dirty = (): [Float64Array, Float64Array] => [
    Float64Array.from({ length: n }, (_, i) => 1e6 * Math.sin(i)),
    Float64Array.from({ length: n }, (_, i) => -3e5 * Math.cos(i)),
  ];

  it('give levenbergMarquardt and chordMinimum the same fit to the last bit, the residuals in one of them', () => {
    for (const stepTolerance of [undefined, 0.001]) {
      const plain = levenbergMarquardt(problem, START, { stepTolerance });
      const buffers = dirty();
      const fit = levenbergMarquardt(problem, START, { stepTolerance, buffers });
      expect([...fit.params]).toEqual([...plain.params]);
      expect([...fit.covariance]).toEqual([...plain.covariance]);
      expect([...fit.residuals]).toEqual([...plain.residuals]);
      expect(buffers).toContain(fit.residuals);
    }
    const near = levenbergMarquardt(problem, START, { stepTolerance: 1 }).params;
    const jtj = normalMatrixAt(problem, near);
    const plainChord = chordMinimum(problem, near, jtj, { stepTolerance: 0.01 });
    const buffers = dirty();
    const chord = chordMinimum(problem, near, jtj, { stepTolerance: 0.01, buffers });
    expect(plainChord).not.toBeNull();
    expect([...(chord?.params ?? [])]).toEqual([...(plainChord?.params ?? [])]);
    expect([...(chord?.residuals ?? [])]).toEqual([...(plainChord?.residuals ?? [])]);
    expect(buffers).toContain(chord?.residuals);
  });

  it('are refused unless they are two distinct arrays of `rows` numbers', () => {
    const short: [Float64Array, Float64Array] = [new Float64Array(n - 1), new Float64Array(n)];
    expect(() => levenbergMarquardt(problem, START, { buffers: short })).toThrow(LsqError);
    const one = new Float64Array(n);
    expect(() => levenbergMarquardt(problem, START, { buffers: [one, one] })).toThrow(LsqError);
    expect(() =>
      chordMinimum(problem, START, new Float64Array(25), { stepTolerance: 1, buffers: short }),
    ).toThrow(LsqError);
  });
});
