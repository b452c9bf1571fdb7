// External-reference checks of the decisions (ILAC-G8:09/2019) and the conformance probability
// (JCGM 106:2012).
import { describe, expect, it } from 'vitest';
import { decide, probabilityInInterval, probabilityOfConformity } from '../../app/engine/conformity';
import type { DecisionRule, Verdict } from '../../app/engine/model';

// Standard normal CDF by Simpson integration of the density: independent of the engine's @stdlib.
function phi(z: number): number {
  const steps = 20000;
  const a = 0;
  const h = (z - a) / steps;
  const pdf = (x: number) => Math.exp((-x * x) / 2) / Math.sqrt(2 * Math.PI);
  let s = pdf(a) + pdf(z);
  for (let i = 1; i < steps; i++) s += (i % 2 ? 4 : 2) * pdf(a + i * h);
  return 0.5 + (s * h) / 3;
}

describe('JCGM 106:2012 conformance probability, normal PDF', () => {
  it('section 7.4 example: y = 13.6, u = 1.8, T_L = 12.5, T_U = 16.3 gives p_c = 0.66', () => {
    // JCGM 106:2012 7.4, example: inputs y = 13.6, u = 1.8, T_L = 12.5, T_U = 16.3 verified by
    // search (metrologyrules.com, 2022/03, quoting the example); the printed result p_c = 0.66 is
    // from memory. Analytically p_c = Phi(1.5) - Phi(-0.6111) = 0.93319 - 0.27056 = 0.66263.
    const pc = probabilityInInterval(12.5, 16.3, 13.6, 1.8);
    expect(pc).toBeCloseTo(phi(1.5) - phi((12.5 - 13.6) / 1.8), 8);
    expect(pc).toBeCloseTo(0.66263, 5);
    expect(Number(pc.toFixed(2))).toBe(0.66);
  });

  it('the same example written as an error against a symmetric tolerance gives the same p_c', () => {
    // Shift the example to a symmetric interval: centre (12.5 + 16.3)/2 = 14.4, T = 1.9, E = -0.8.
    expect(probabilityOfConformity(13.6 - 14.4, 1.9, 1.8)).toBeCloseTo(0.66263, 5);
  });

  it('an error on the tolerance limit with small u has p_c = 0.5', () => {
    // JCGM 106:2012 section 7 (a measured value at a tolerance limit, normal PDF, far from the
    // other limit): half the probability lies on each side. Analytic.
    expect(probabilityOfConformity(1000, 1000, 1)).toBeCloseTo(0.5, 12);
    expect(probabilityOfConformity(-1000, 1000, 1)).toBeCloseTo(0.5, 12);
  });

  it('an error of zero with T = 2u has p_c = Phi(2) - Phi(-2) = 0.9545', () => {
    // JCGM 100:2008 G.1.3 (from memory): +-2 sigma encloses 95.45 % of a normal distribution.
    expect(probabilityOfConformity(0, 2, 1)).toBeCloseTo(0.9545, 4);
    expect(probabilityOfConformity(0, 2, 1)).toBeCloseTo(2 * phi(2) - 1, 8);
  });
});

describe('ILAC-G8:09/2019 decision zones at their exact boundaries', () => {
  // Numbers chosen exact in binary: T = 1000 Hz, U = 250 Hz (u = 125 Hz).
  const T = 1000;
  const U = 250;
  const base = { toleranceHz: T, combinedHz: 125, expandedHz: U, readingHz: 1e9 };
  const verdict = (rule: DecisionRule, errorHz: number): Verdict =>
    decide(rule, { ...base, errorHz }).verdict;
  const justAbove = (x: number) => x + 1e-9;

  it('4.2.1 simple acceptance (w = 0): pass up to and including T, fail above', () => {
    // ILAC-G8:09/2019 4.2.1 (verified by search): AL = TL.
    const rule: DecisionRule = { kind: 'simple' };
    expect(verdict(rule, T)).toBe('pass');
    expect(verdict(rule, -T)).toBe('pass');
    expect(verdict(rule, justAbove(T))).toBe('fail');
    expect(verdict(rule, -justAbove(T))).toBe('fail');
    const d = decide(rule, { ...base, errorHz: 0 });
    expect(d.guardBandHz).toBe(0);
    expect(d.acceptanceLimitHz).toBe(T);
  });

  it('4.2.2 binary with guard band w = U: pass up to and including T - U, fail above', () => {
    // ILAC-G8:09/2019 4.2.2 (verified by search): AL = TL - w.
    const rule: DecisionRule = { kind: 'guarded', multipleOfU: 1 };
    expect(verdict(rule, T - U)).toBe('pass');
    expect(verdict(rule, -(T - U))).toBe('pass');
    expect(verdict(rule, justAbove(T - U))).toBe('fail');
    expect(verdict(rule, T)).toBe('fail');
    const d = decide(rule, { ...base, errorHz: 0 });
    expect(d.guardBandHz).toBe(U);
    expect(d.acceptanceLimitHz).toBe(T - U);
  });

  it('4.2.2 binary with w = 0.5 U', () => {
    const rule: DecisionRule = { kind: 'guarded', multipleOfU: 0.5 };
    expect(verdict(rule, 875)).toBe('pass');
    expect(verdict(rule, justAbove(875))).toBe('fail');
  });

  it('4.2.2 binary with a fixed guard band in ppm of the reading', () => {
    // w = 0.2 ppm of the 1e9 Hz reading = 200 Hz; AL = T - w = 800 Hz.
    const rule: DecisionRule = { kind: 'guarded-fixed', guardBandPpm: 0.2 };
    const d = decide(rule, { ...base, errorHz: 800 });
    expect(d.guardBandHz).toBe(200);
    expect(d.acceptanceLimitHz).toBe(800);
    expect(d.verdict).toBe('pass');
    expect(verdict(rule, justAbove(800))).toBe('fail');
  });

  it('4.2.3 non-binary with w = U: pass / conditional pass / conditional fail / fail', () => {
    // ILAC-G8:09/2019 4.2.3 (verified by search): pass below TL - w; conditional pass in
    // [TL - w, TL]; conditional fail in [TL, TL + w]; fail above TL + w. Shared ends are given
    // to the more favourable verdict (conformity.ts).
    const rule: DecisionRule = { kind: 'non-binary' };
    expect(verdict(rule, 0)).toBe('pass');
    expect(verdict(rule, T - U)).toBe('pass');
    expect(verdict(rule, justAbove(T - U))).toBe('conditional-pass');
    expect(verdict(rule, T)).toBe('conditional-pass');
    expect(verdict(rule, justAbove(T))).toBe('conditional-fail');
    expect(verdict(rule, T + U)).toBe('conditional-fail');
    expect(verdict(rule, justAbove(T + U))).toBe('fail');
    expect(verdict(rule, -(T + U))).toBe('conditional-fail');
    expect(verdict(rule, -justAbove(T + U))).toBe('fail');
  });

  it('reports the test uncertainty ratio T/U and p_c with every decision', () => {
    // TUR = tolerance half-width / U: common practice.
    const d = decide({ kind: 'simple' }, { ...base, errorHz: 1000 });
    expect(d.tur).toBe(4);
    expect(d.probabilityOfConformity).toBeCloseTo(0.5, 10);
  });
});
