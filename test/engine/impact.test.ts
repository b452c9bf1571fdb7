// Re-judging a stored point with a changed reference (app/engine/impact.ts), against cases worked
// by hand. Budget arithmetic: JCGM 100:2008 (GUM) 5.1.2 eq. (10) and G.4.1 eq. (G.2b); decision
// zones: ILAC-G8:09/2019 4.2.1 (simple acceptance) and 4.2.3 (non-binary, w = U); sign of the
// deviation: VIM (JCGM 200:2012) 2.16 (error = indicated minus reference).
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { combine, makeContribution } from '../../app/engine/budget';
import { decide } from '../../app/engine/conformity';
import { coverageFactor } from '../../app/engine/distributions';
import { deviationAtHz, rejudgePoint, type StoredPointResult } from '../../app/engine/impact';
import type { Contribution, DecisionRule } from '../../app/engine/model';

function line(key: Contribution['key'], contributionHz: number, dof: number): Contribution {
  return makeContribution({
    key,
    label: key,
    type: Number.isFinite(dof) ? 'A' : 'B',
    distribution: Number.isFinite(dof) ? 't' : 'normal',
    unit: 'Hz',
    standardUncertainty: contributionHz,
    sensitivity: 1,
    dof,
  });
}

/** A stored result made the way evaluate.ts makes one: combine the lines, then decide. */
function stored(
  errorHz: number,
  lines: Contribution[],
  toleranceHz: number,
  rule: DecisionRule,
  correctedHz = 10e9,
): StoredPointResult {
  const budget = combine(lines);
  const decision = decide(rule, {
    errorHz,
    toleranceHz,
    combinedHz: budget.combinedHz,
    expandedHz: budget.expandedHz,
    readingHz: correctedHz,
  });
  return { correctedHz, errorHz, budget, decision };
}

describe('deviationAtHz', () => {
  it('takes a relative deviation of the reference frequency', () => {
    // 0.3 ppm of 10 GHz = 0.3 * 1e10 / 1e6 = 3000 Hz; 0.05 ppm of 10 GHz = 500 Hz.
    expect(deviationAtHz({ unit: 'ppm', value: 0.3, standardUncertainty: 0.05 }, 10e9)).toEqual({
      deviationHz: 3000,
      uncertaintyHz: 500,
    });
  });
  it('takes an absolute deviation as it is', () => {
    expect(deviationAtHz({ unit: 'Hz', value: -7500, standardUncertainty: 800 }, 9e9)).toEqual({
      deviationHz: -7500,
      uncertaintyHz: 800,
    });
  });
  it('refuses a unit it does not know and a negative uncertainty', () => {
    expect(() => deviationAtHz({ unit: 'GHz' as 'Hz', value: 1, standardUncertainty: 0 }, 9e9)).toThrow(
      /deviation.unit/,
    );
    expect(() => deviationAtHz({ unit: 'Hz', value: 1, standardUncertainty: -1 }, 9e9)).toThrow(
      /must not be negative/,
    );
  });
});

describe('rejudgePoint, hand-computed', () => {
  it('simple acceptance: a +0.3 ppm deviation turns a pass at 8 kHz into a fail', () => {
    // Stored: E = 8000 Hz, lines 300 Hz (nu = inf) and 400 Hz (nu = 4), T = 10000 Hz.
    //   u_c = sqrt(300^2 + 400^2) = 500 Hz; nu_eff = 500^4 / (400^4 / 4) = 625 / 64 = 9.765625.
    //   |E| = 8000 <= T: pass (ILAC-G8 4.2.1, w = 0).
    // Deviation +0.3 ppm at 10 GHz: d = 3000 Hz, u_d = 0.05 ppm = 500 Hz.
    //   E' = 8000 + 3000 = 11000 Hz > T: fail.
    //   u_c' = sqrt(500^2 + 500^2) = 707.1067811865476 Hz;
    //   nu_eff' = (500000)^2 / (400^4 / 4) = 2.5e11 / 6.4e9 = 39.0625; k' = t(0.97725; 39).
    const s = stored(8000, [line('reference', 300, Infinity), line('repeatability', 400, 4)], 10000, {
      kind: 'simple',
    });
    expect(s.decision.verdict).toBe('pass');
    expect(s.budget.effectiveDof).toBeCloseTo(9.765625, 9);
    const r = rejudgePoint(s, 10e9, { unit: 'ppm', value: 0.3, standardUncertainty: 0.05 });
    expect(r.deviationHz).toBe(3000);
    expect(r.errorHz).toBe(11000);
    expect(r.errorPpm).toBeCloseTo(1.1, 12);
    expect(r.budget.combinedHz).toBeCloseTo(707.1067811865476, 9);
    expect(r.budget.effectiveDof).toBeCloseTo(39.0625, 9);
    expect(r.budget.coverageFactor).toBe(coverageFactor(39.0625));
    expect(r.budget.expandedHz).toBeCloseTo(coverageFactor(39.0625) * 707.1067811865476, 6);
    expect(r.budget.contributions.map((c) => c.key)).toEqual([
      'reference',
      'repeatability',
      'reference-deviation',
    ]);
    expect(r.verdictBefore).toBe('pass');
    expect(r.verdict).toBe('fail');
    expect(r.verdictChanged).toBe(true);
  });

  it('non-binary: a -7.5 kHz deviation moves a pass into conditional pass', () => {
    // Stored: E = -2000 Hz, one line 600 Hz (nu = inf), T = 10000 Hz, w = U.
    //   U = k u_c = 2.000 * 600 = 1200 Hz (k from the normal at 0.97725, about 2.000);
    //   |E| = 2000 <= T - U = 8800: pass (ILAC-G8 4.2.3).
    // Deviation -7500 Hz absolute, u_d = 800 Hz:
    //   E' = -2000 - 7500 = -9500 Hz; u_c' = sqrt(600^2 + 800^2) = 1000 Hz; U' = 2000 Hz;
    //   T - U' = 8000 < 9500 <= T = 10000: conditional pass.
    const s = stored(-2000, [line('reference', 600, Infinity)], 10000, { kind: 'non-binary' });
    expect(s.decision.verdict).toBe('pass');
    const r = rejudgePoint(s, 9e9, { unit: 'Hz', value: -7500, standardUncertainty: 800 });
    expect(r.errorHz).toBe(-9500);
    expect(r.budget.combinedHz).toBe(1000);
    expect(r.budget.effectiveDof).toBe(Infinity);
    expect(r.budget.expandedHz).toBeCloseTo(2000, 0);
    expect(r.decision.guardBandHz).toBeCloseTo(2000, 0);
    expect(r.verdict).toBe('conditional-pass');
    expect(r.verdictChanged).toBe(true);
  });

  it('a deviation that brings the error back inside keeps a fail from standing', () => {
    // Stored: E = 10500 Hz, line 100 Hz, T = 10000 Hz, simple: fail.
    // Deviation -1 ppm at 1 GHz: d = -1000 Hz, u_d = 0: E' = 9500 Hz <= T: pass.
    const s = stored(10500, [line('reference', 100, Infinity)], 10000, { kind: 'simple' });
    const r = rejudgePoint(s, 1e9, { unit: 'ppm', value: -1, standardUncertainty: 0 });
    expect(r.errorHz).toBe(9500);
    expect(r.budget.combinedHz).toBe(100);
    expect(r.verdictBefore).toBe('fail');
    expect(r.verdict).toBe('pass');
  });

  it('refuses a stored result it cannot judge', () => {
    const bad = { correctedHz: 1e9, errorHz: 0 } as unknown as StoredPointResult;
    expect(() => rejudgePoint(bad, 1e9, { unit: 'Hz', value: 0, standardUncertainty: 0 })).toThrow(
      /budget and a decision/,
    );
  });
});

describe('rejudgePoint, properties', () => {
  const rules = fc.constantFrom<DecisionRule>(
    { kind: 'simple' },
    { kind: 'guarded', multipleOfU: 1 },
    { kind: 'guarded-fixed', guardBandPpm: 50 },
    { kind: 'non-binary' },
  );
  const lines = fc.array(
    fc.record({
      u: fc.double({ min: 0, max: 1e5, noNaN: true }),
      dof: fc.oneof(fc.constant(Infinity), fc.integer({ min: 1, max: 50 })),
    }),
    { minLength: 1, maxLength: 8 },
  );

  it('a zero deviation with zero added uncertainty changes no verdict, error or U', () => {
    // Adding 0 to the error and a 0 Hz line to the budget leaves u_c, nu_eff (a zero line adds
    // nothing to the Welch-Satterthwaite sum), k, U and so the decision as they were.
    fc.assert(
      fc.property(
        lines,
        fc.double({ min: -5e5, max: 5e5, noNaN: true }),
        fc.double({ min: 0, max: 5e5, noNaN: true }),
        rules,
        fc.double({ min: 1e8, max: 1e11, noNaN: true }),
        fc.constantFrom<'ppm' | 'Hz'>('ppm', 'Hz'),
        (ls, errorHz, toleranceHz, rule, referenceHz, unit) => {
          const s = stored(
            errorHz,
            ls.map((l, i) => line(i === 0 ? 'reference' : 'repeatability', l.u, l.dof)),
            toleranceHz,
            rule,
            referenceHz,
          );
          const r = rejudgePoint(s, referenceHz, { unit, value: 0, standardUncertainty: 0 });
          expect(r.verdict).toBe(s.decision.verdict);
          expect(r.verdictChanged).toBe(false);
          // -0 + 0 is +0: the same number, so compare with === rather than Object.is.
          expect(r.errorHz === s.errorHz).toBe(true);
          expect(r.budget.combinedHz).toBe(s.budget.combinedHz);
          expect(r.budget.expandedHz).toBe(s.budget.expandedHz);
        },
      ),
    );
  });

  it('an added uncertainty never lowers U', () => {
    fc.assert(
      fc.property(lines, fc.double({ min: 0, max: 1e5, noNaN: true }), (ls, ud) => {
        const s = stored(
          0,
          ls.map((l) => line('repeatability', l.u, l.dof)),
          1e4,
          { kind: 'simple' },
        );
        const r = rejudgePoint(s, 1e10, { unit: 'Hz', value: 0, standardUncertainty: ud });
        expect(r.budget.combinedHz).toBeGreaterThanOrEqual(s.budget.combinedHz);
      }),
    );
  });
});
