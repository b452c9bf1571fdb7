// The remembered quantiles of app/engine/distributions.ts (kept by the numbers themselves, and the
// normal quantile of a budget with no finite degrees of freedom; issue 8) give exactly what
// @stdlib computes, however often and in whatever order they are asked for, including after the
// memo has been emptied for size. Also: decide() still names the first non-finite input.
import fc from 'fast-check';
import stdlibNormalQuantile from '@stdlib/stats-base-dists-normal-quantile';
import stdlibTQuantile from '@stdlib/stats-base-dists-t-quantile';
import { describe, expect, it } from 'vitest';
import { decide } from '../../app/engine/conformity';
import { coverageFactor, tQuantile } from '../../app/engine/distributions';

const same = (a: number, b: number) => Object.is(a, b) || (Number.isNaN(a) && Number.isNaN(b));

describe('remembered quantiles', () => {
  it('tQuantile answers what @stdlib answers, asked once or again, for any p and dof', () => {
    const p = fc.oneof(
      fc.constantFrom(0.9545, 0.97725, 0.975, 0.5, 0, 1, -0, Number.NaN),
      fc.double({ min: 0, max: 1, noNaN: true }),
    );
    const dof = fc.oneof(
      fc.integer({ min: 1, max: 200 }),
      fc.double({ min: 0.5, max: 1e6, noNaN: true }),
      fc.constantFrom(0, -0, -1, Number.NaN, Infinity),
    );
    fc.assert(
      fc.property(fc.array(fc.tuple(p, dof), { minLength: 1, maxLength: 20 }), (pairs) => {
        // Twice over, so the second round is answered from the memo.
        for (const [pp, nu] of [...pairs, ...pairs]) {
          const expected = nu === Infinity ? stdlibNormalQuantile(pp, 0, 1) : stdlibTQuantile(pp, nu);
          expect(same(tQuantile(pp, nu), expected)).toBe(true);
        }
      }),
      { numRuns: 300 },
    );
  });

  it('stays right after the memo is emptied for size (more than 4096 pairs asked)', () => {
    const pairs = Array.from(
      { length: 5000 },
      (_, i) => [0.9 + (i % 50) / 1000, 1 + Math.floor(i / 50)] as const,
    );
    for (const [p, nu] of pairs) tQuantile(p, nu);
    for (const [p, nu] of pairs.filter((_, i) => i % 97 === 0))
      expect(Object.is(tQuantile(p, nu), stdlibTQuantile(p, nu))).toBe(true);
  });

  it('coverageFactor with no finite degrees of freedom is the normal quantile, every time', () => {
    for (const p of [0.9545, 0.95, 0.99, 0.9545, 0.6827, 0.95]) {
      const k = stdlibNormalQuantile((1 + p) / 2, 0, 1);
      expect(Object.is(coverageFactor(Infinity, p), k)).toBe(true);
      expect(Object.is(coverageFactor(Infinity, p), k)).toBe(true);
    }
    // About 2.000 for 95.45 % (JCGM 100:2008 Table G.1: 95.45 % -> k = 2).
    expect(coverageFactor(Infinity)).toBeCloseTo(2, 3);
    // Truncated degrees of freedom (GUM G.4.1): 4.9999999999 counts as 5, 5.7 as 5.
    expect(Object.is(coverageFactor(5.7), stdlibTQuantile(0.97725, 5))).toBe(true);
    expect(Object.is(coverageFactor(4.9999999999), stdlibTQuantile(0.97725, 5))).toBe(true);
  });
});

describe('decide refuses non-finite inputs as before', () => {
  const inputs = { errorHz: 1, toleranceHz: 10, combinedHz: 1, expandedHz: 2, readingHz: 9e9 };
  it.each(Object.keys(inputs))('names %s', (name) => {
    expect(() => decide({ kind: 'simple' }, { ...inputs, [name]: Number.NaN })).toThrow(
      `decision: ${name} must be a finite number (got NaN)`,
    );
  });
  it('names the first of two in the order the fields were given', () => {
    const readingFirst = { readingHz: Infinity, errorHz: 1, toleranceHz: 10, combinedHz: 1, expandedHz: NaN };
    expect(() => decide({ kind: 'simple' }, readingFirst)).toThrow(
      'decision: readingHz must be a finite number (got Infinity)',
    );
    expect(() => decide({ kind: 'simple' }, { ...inputs, expandedHz: NaN, errorHz: -Infinity })).toThrow(
      'decision: errorHz must be a finite number (got -Infinity)',
    );
  });
});
