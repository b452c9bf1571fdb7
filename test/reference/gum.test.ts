// External-reference checks of the GUM budget arithmetic (JCGM 100:2008).
import { beforeEach, describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  combine,
  makeContribution,
  normalFromCertificate,
  rectangular,
  typeA,
} from '../../app/engine/budget';
import { coverageFactor } from '../../app/engine/distributions';
import type { Budget, Contribution } from '../../app/engine/model';

function relativeLine(key: Contribution['key'], uPct: number, dof: number): Contribution {
  return makeContribution({
    key,
    label: key,
    type: 'A',
    distribution: 't',
    unit: '%',
    standardUncertainty: uPct,
    sensitivity: 1,
    dof,
  });
}

function roundTo(value: number, significant: number): number {
  return Number(value.toPrecision(significant));
}

describe('JCGM 100:2008 G.4.1 example (Welch-Satterthwaite)', () => {
  // JCGM 100:2008 G.4.1, EXAMPLE (numbers from memory, not verified by search): Y = b X1 X2 X3,
  // relative standard uncertainties 0.25 % (N = 10, nu = 9), 0.57 % (N = 5, nu = 4) and
  // 0.82 % (N = 15, nu = 14); u_c/y = 1.03 %, nu_eff = 19.0, t_95(19) = 2.09, U_95 = 2.2 %.
  let budget95: Budget;
  beforeEach(() => {
    budget95 = combine(
      [
        relativeLine('repeatability', 0.25, 9),
        relativeLine('setting', 0.57, 4),
        relativeLine('fit', 0.82, 14),
      ],
      0.95,
    );
  });

  it('combines to u_c = 1.03 %', () => {
    expect(roundTo(budget95.combinedHz, 3)).toBe(1.03);
  });

  it('gives nu_eff = 19.0 at the printed precision', () => {
    // Unrounded inputs give 18.9987; the example prints 19.0 (it carried u_c rounded to 1.03 %).
    expect(budget95.effectiveDof).toBeCloseTo(18.9987, 4);
    expect(roundTo(budget95.effectiveDof, 3)).toBe(19.0);
  });

  it('gives U_95 = 2.2 %', () => {
    // Truncating the unrounded 18.9987 gives nu = 18 and k = t_95(18) = 2.101 rather than the
    // example's t_95(19) = 2.09 (its nu_eff came from the rounded u_c); U rounds to 2.2 % either way.
    expect(budget95.coverageFactor).toBeCloseTo(2.101, 3);
    expect(roundTo(budget95.expandedHz, 2)).toBe(2.2);
    // t_95(19) = 2.09: JCGM 100:2008 Table G.2 (95 % column); also NIST TN 1297 Table B.1, verified.
    expect(roundTo(coverageFactor(19, 0.95), 3)).toBe(2.09);
  });

  it('truncates nu_eff to the next lower integer before looking up t (G.4.1)', () => {
    // JCGM 100:2008 G.4.1 (from memory): a non-integer nu_eff is truncated to the next lower integer.
    expect(coverageFactor(18.9987, 0.95)).toBe(coverageFactor(18, 0.95));
    expect(coverageFactor(4.9)).toBe(coverageFactor(4));
  });
});

describe('JCGM 100:2008 Table G.2: t_p(nu) for p = 95.45 %', () => {
  // JCGM 100:2008 Table G.2, column 95.45 %; verified against NIST TN 1297 (1994) Appendix B,
  // Table B.1, the same table, found by search (nist.gov, "NIST TN 1297: Guidelines - Appendix B").
  const table: Array<[number, number, number]> = [
    // [nu, printed value, decimals printed]
    [1, 13.97, 2],
    [2, 4.53, 2],
    [3, 3.31, 2],
    [4, 2.87, 2],
    [5, 2.65, 2],
    [10, 2.28, 2],
    [20, 2.13, 2],
    [50, 2.05, 2],
    [100, 2.025, 3],
    [Infinity, 2.0, 3],
  ];
  for (const [nu, printed, decimals] of table) {
    it(`nu = ${nu}: ${printed}`, () => {
      expect(Number(coverageFactor(nu).toFixed(decimals))).toBe(printed);
    });
  }
});

describe('GUM budget helpers and combination', () => {
  it('Type A: u = s/sqrt(n), nu = n - 1 (JCGM 100:2008 4.2.3, G.3.3)', () => {
    const line = typeA({ key: 'repeatability', label: 'r', unit: 'Hz', sensitivity: 1 }, 2000, 4);
    expect(line.standardUncertainty).toBe(1000);
    expect(line.dof).toBe(3);
    expect(line.type).toBe('A');
  });

  it('rectangular: u = a/sqrt(3), nu infinite (JCGM 100:2008 4.3.7)', () => {
    const line = rectangular({ key: 'resolution', label: 'res', unit: 'Hz', sensitivity: -2 }, Math.sqrt(3));
    expect(line.standardUncertainty).toBeCloseTo(1, 15);
    expect(line.contributionHz).toBeCloseTo(2, 15);
    expect(line.dof).toBe(Infinity);
  });

  it('from a certificate: u = U/k (JCGM 100:2008 4.3.3)', () => {
    const line = normalFromCertificate(
      { key: 'reference', label: 'ref', unit: 'Hz', sensitivity: -1 },
      93,
      2,
    );
    expect(line.standardUncertainty).toBe(46.5);
    expect(line.contributionHz).toBe(46.5);
  });

  it('all-infinite degrees of freedom give nu_eff = Infinity and the normal k', () => {
    const b = combine([
      rectangular({ key: 'resolution', label: 'a', unit: 'Hz', sensitivity: 1 }, 3),
      normalFromCertificate({ key: 'reference', label: 'b', unit: 'Hz', sensitivity: -1 }, 8, 2),
    ]);
    expect(b.effectiveDof).toBe(Infinity);
    expect(b.combinedHz).toBeCloseTo(Math.sqrt(3 + 16), 12);
    expect(b.coverageFactor).toBeCloseTo(2.0, 4);
    expect(b.expandedHz).toBeCloseTo(b.coverageFactor * b.combinedHz, 12);
  });

  it('zero contributions are ignored in nu_eff (a zero Type A line does not force nu_eff = 0)', () => {
    const b = combine([relativeLine('repeatability', 0, 2), relativeLine('setting', 1, 10)]);
    expect(b.effectiveDof).toBeCloseTo(10, 12);
  });

  it('nu_eff lies between the smallest nu_i and the sum of the nu_i (property of G.2b)', () => {
    // Common practice: a known property of the Welch-Satterthwaite formula for positive terms.
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.double({ min: 0.01, max: 100, noNaN: true }), fc.integer({ min: 1, max: 50 })), {
          minLength: 1,
          maxLength: 8,
        }),
        (terms) => {
          const b = combine(terms.map(([u, nu]) => relativeLine('fit', u, nu)));
          const nus = terms.map(([, nu]) => nu);
          const lo = Math.min(...nus);
          const hi = nus.reduce((s, v) => s + v, 0);
          return b.effectiveDof >= lo * (1 - 1e-9) && b.effectiveDof <= hi * (1 + 1e-9);
        },
      ),
    );
  });
});

describe('round-off in the effective degrees of freedom', () => {
  it('keeps nu_eff at the smallest nu_i when every line has the same nu (JCGM 100:2008 G.4.1, eq. G.2b)', () => {
    // Three equal-dof lines: W-S gives exactly nu in exact arithmetic; floats may give nu - 1e-16.
    const lines = [0.37, 1.91, 0.05].map((u, i) =>
      makeContribution({
        key: 'repeatability',
        label: `line ${i}`,
        type: 'A',
        distribution: 't',
        unit: 'Hz',
        standardUncertainty: u,
        sensitivity: 1,
        dof: 1,
      }),
    );
    const b = combine(lines);
    expect(b.effectiveDof).toBeGreaterThanOrEqual(1);
    expect(b.coverageFactor).toBeCloseTo(13.97, 2); // Table G.2, nu = 1, p = 95.45 %
  });
});
