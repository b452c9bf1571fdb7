// Decisions and conformance probabilities at the edges of their inputs: a zero uncertainty, a
// guard band of exactly zero, refused negative or non-finite inputs. Sources are named beside
// each check (ILAC-G8:09/2019, JCGM 106:2012) or marked common practice.
import { describe, expect, it } from 'vitest';
import {
  decide,
  guardBandHz,
  probabilityInInterval,
  probabilityOfConformity,
  toleranceHz,
  type DecisionInputs,
} from '../../app/engine/conformity';
import type { DecisionRule } from '../../app/engine/model';

// Numbers exact in binary: T = 1000 Hz, U = 250 Hz, u = 125 Hz, reading 1 GHz.
const base: DecisionInputs = {
  errorHz: 0,
  toleranceHz: 1000,
  combinedHz: 125,
  expandedHz: 250,
  readingHz: 1e9,
};

describe('JCGM 106:2012 7.4 conformance probability with a zero standard uncertainty', () => {
  // With u -> 0 the normal PDF concentrates on the estimate: p_c is 1 when the estimate lies in the
  // tolerance interval (ends included, as the decision rule counts a result on a limit as inside)
  // and 0 outside. The limit of Phi((T - E)/u) - Phi((-T - E)/u); common practice for u = 0.
  it('is exactly 1 inside the interval and on either end, never NaN', () => {
    expect(probabilityInInterval(-1000, 1000, 0, 0)).toBe(1);
    expect(probabilityInInterval(-1000, 1000, 1000, 0)).toBe(1);
    expect(probabilityInInterval(-1000, 1000, -1000, 0)).toBe(1);
    expect(probabilityOfConformity(1000, 1000, 0)).toBe(1);
    expect(probabilityOfConformity(-1000, 1000, 0)).toBe(1);
  });

  it('is exactly 0 beyond either end', () => {
    expect(probabilityInInterval(-1000, 1000, 1000.5, 0)).toBe(0);
    expect(probabilityInInterval(-1000, 1000, -1000.5, 0)).toBe(0);
    expect(probabilityOfConformity(1001, 1000, 0)).toBe(0);
  });

  it('an error on the limit with u = 0 passes simple acceptance with p_c = 1 and an infinite TUR', () => {
    // ILAC-G8:09/2019 4.2.1: AL = TL, a result on the limit passes (conformity.ts boundary note).
    // TUR = T/U is unbounded when U = 0 (common practice).
    const d = decide({ kind: 'simple' }, { ...base, errorHz: 1000, combinedHz: 0, expandedHz: 0 });
    expect(d.verdict).toBe('pass');
    expect(d.probabilityOfConformity).toBe(1);
    expect(d.tur).toBe(Infinity);
  });

  it('with u > 0 is strictly between 0 and 1 and symmetric in the sign of the error', () => {
    // JCGM 106:2012 7.4: p_c = Phi((T_U - y)/u) - Phi((T_L - y)/u), symmetric for T_L = -T_U.
    const a = probabilityOfConformity(600, 1000, 200);
    expect(a).toBeGreaterThan(0);
    expect(a).toBeLessThan(1);
    expect(probabilityOfConformity(-600, 1000, 200)).toBeCloseTo(a, 14);
    // Phi(2) - Phi(-8): 0.97725 to five places (normal table, JCGM 100:2008 Table G.1 region).
    expect(a).toBeCloseTo(0.97725, 5);
  });
});

describe('ILAC-G8:09/2019 4.2.2 guard band of exactly zero', () => {
  // A guard band w = 0 makes the binary rule simple acceptance: AL = TL - 0 = TL.
  const rules: DecisionRule[] = [
    { kind: 'guarded', multipleOfU: 0 },
    { kind: 'guarded-fixed', guardBandPpm: 0 },
  ];
  for (const rule of rules) {
    it(`${rule.kind}: passes on the tolerance limit itself, fails just beyond it`, () => {
      const on = decide(rule, { ...base, errorHz: 1000 });
      expect(on.guardBandHz).toBe(0);
      expect(on.acceptanceLimitHz).toBe(1000);
      expect(on.verdict).toBe('pass');
      expect(decide(rule, { ...base, errorHz: -1000.001 }).verdict).toBe('fail');
    });
  }
});

describe('decision results carry the rule, the tolerance and the guard band they used', () => {
  it('echoes the rule and T, and gives w = U for the non-binary rule (ILAC-G8:09/2019 4.2.3)', () => {
    const rule: DecisionRule = { kind: 'non-binary' };
    const d = decide(rule, { ...base, errorHz: 1100 });
    expect(d.rule).toEqual(rule);
    expect(d.toleranceHz).toBe(1000);
    expect(d.guardBandHz).toBe(250);
    expect(d.acceptanceLimitHz).toBe(750);
    expect(d.verdict).toBe('conditional-fail');
    expect(guardBandHz(rule, 250, 1e9)).toBe(250);
    expect(guardBandHz({ kind: 'simple' }, 250, 1e9)).toBe(0);
    expect(guardBandHz({ kind: 'guarded', multipleOfU: 2 }, 250, 1e9)).toBe(500);
  });

  it('a fixed guard band in ppm and the tolerance are widths: the same for a reading of either sign', () => {
    // Common practice: a tolerance or guard band stated "in ppm of reading" is a magnitude.
    expect(guardBandHz({ kind: 'guarded-fixed', guardBandPpm: 0.2 }, 0, -1e9)).toBe(200);
    expect(toleranceHz({ accuracyRelPpm: 1000, accuracyAbsHz: 0 }, -1e9)).toBe(1e6);
  });

  it('a tolerance adds its relative and absolute parts (e.g. 0.1 % of reading + 2 MHz)', () => {
    // Common practice for stated accuracy "x % of reading + y": the two parts add.
    expect(toleranceHz({ accuracyRelPpm: 1000, accuracyAbsHz: 2e6 }, 1e10)).toBe(1.2e7);
    expect(toleranceHz({ accuracyRelPpm: 500, accuracyAbsHz: 0 }, 4e9)).toBe(2e6);
  });
});

describe('refused inputs (a computation that cannot judge its result refuses with the reason)', () => {
  it('refuses a negative tolerance, standard or expanded uncertainty', () => {
    // Common practice: a tolerance half-width and uncertainties are non-negative by definition
    // (JCGM 100:2008 2.3.1, 2.3.5).
    expect(() => decide({ kind: 'simple' }, { ...base, toleranceHz: -1 })).toThrow(/must not be negative/);
    expect(() => decide({ kind: 'simple' }, { ...base, combinedHz: -1 })).toThrow(/must not be negative/);
    expect(() => decide({ kind: 'simple' }, { ...base, expandedHz: -1 })).toThrow(/must not be negative/);
  });

  it('accepts zero tolerance and zero uncertainties (the limit cases)', () => {
    const d = decide(
      { kind: 'simple' },
      { ...base, errorHz: 0, toleranceHz: 0, combinedHz: 0, expandedHz: 0 },
    );
    expect(d.verdict).toBe('pass');
    expect(d.probabilityOfConformity).toBe(1);
    // With U = 0 the ratio T/U is taken as unbounded, even for T = 0 (common practice).
    expect(d.tur).toBe(Infinity);
  });

  it('refuses a negative or missing guard band', () => {
    expect(() => decide({ kind: 'guarded', multipleOfU: -0.5 }, base)).toThrow(
      /multiple of U must not be negative/,
    );
    expect(() => decide({ kind: 'guarded', multipleOfU: NaN }, base)).toThrow(
      /multiple of U must not be negative/,
    );
    expect(() => decide({ kind: 'guarded-fixed', guardBandPpm: -0.1 }, base)).toThrow(
      /fixed guard band must not be negative/,
    );
    expect(() => decide({ kind: 'guarded-fixed', guardBandPpm: NaN }, base)).toThrow(
      /fixed guard band must not be negative/,
    );
  });

  it('refuses a non-finite input and names it', () => {
    for (const name of ['errorHz', 'toleranceHz', 'combinedHz', 'expandedHz', 'readingHz'] as const) {
      for (const bad of [NaN, Infinity, -Infinity]) {
        expect(() => decide({ kind: 'simple' }, { ...base, [name]: bad })).toThrow(
          new RegExp(`decision: ${name} must be a finite number \\(got ${String(bad)}\\)`),
        );
      }
    }
  });
});
