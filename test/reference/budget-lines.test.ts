// Budget lines and their combination at the edges: refused inputs, the smallest Type A evaluation,
// Welch-Satterthwaite worked by hand, and the stored shape of a line. Sources: JCGM 100:2008 (GUM)
// clauses named beside each check, or common practice.
import { describe, expect, it } from 'vitest';
import {
  combine,
  makeContribution,
  normalFromCertificate,
  rectangular,
  typeA,
  type ContributionInput,
} from '../../app/engine/budget';
import { coverageFactor } from '../../app/engine/distributions';

const identity = { key: 'reference', label: 'Reference', unit: 'Hz', sensitivity: -2 } as const;

function input(change: Partial<ContributionInput> = {}): ContributionInput {
  return {
    key: 'temperature',
    label: 'Bench temperature',
    type: 'B',
    distribution: 'normal',
    unit: 'degC',
    standardUncertainty: 0.1,
    sensitivity: -200,
    dof: Infinity,
    ...change,
  };
}

describe('a budget line: contribution |c_i| u(x_i) (JCGM 100:2008 5.1.3, eq. 10)', () => {
  it('uses the magnitude of the sensitivity coefficient', () => {
    const line = makeContribution(input({ standardUncertainty: 0.5, sensitivity: -300 }));
    expect(line.contributionHz).toBe(150);
    expect(line.sensitivity).toBe(-300);
  });

  it('accepts a zero standard uncertainty and an infinite number of degrees of freedom', () => {
    const line = makeContribution(input({ standardUncertainty: 0 }));
    expect(line.contributionHz).toBe(0);
    expect(line.dof).toBe(Infinity);
  });

  it('refuses a NaN or infinite standard uncertainty or sensitivity, naming the line', () => {
    // Common practice (and this product's rule): a computation that cannot judge its own result
    // refuses with the reason.
    for (const bad of [NaN, Infinity, -Infinity]) {
      expect(() => makeContribution(input({ standardUncertainty: bad }))).toThrow(
        `temperature: standard uncertainty must be a finite number (got ${String(bad)})`,
      );
      expect(() => makeContribution(input({ sensitivity: bad }))).toThrow(
        `temperature: sensitivity must be a finite number (got ${String(bad)})`,
      );
    }
  });

  it('refuses a negative standard uncertainty (JCGM 100:2008 2.3.1: a standard deviation)', () => {
    expect(() => makeContribution(input({ standardUncertainty: -0.1 }))).toThrow(
      'temperature: standard uncertainty must not be negative',
    );
  });

  it('refuses degrees of freedom that are zero, negative or NaN (JCGM 100:2008 G.3: nu > 0)', () => {
    for (const bad of [0, -1, NaN]) {
      expect(() => makeContribution(input({ dof: bad }))).toThrow(
        `temperature: degrees of freedom must be positive (got ${bad})`,
      );
    }
    expect(makeContribution(input({ dof: 0.5 })).dof).toBe(0.5);
  });

  it('keeps the fields in the order they were given (the stored result text depends on it)', () => {
    // Common practice for stored records: the same input gives the same bytes.
    const line = makeContribution(input());
    expect(Object.keys(line)).toEqual([
      'key',
      'label',
      'type',
      'distribution',
      'unit',
      'standardUncertainty',
      'sensitivity',
      'dof',
      'contributionHz',
    ]);
    const { label, key, ...rest } = input();
    const reordered = makeContribution({ label, key, ...rest });
    expect(Object.keys(reordered).slice(0, 2)).toEqual(['label', 'key']);
    expect(reordered).toEqual(line);
    const extra = makeContribution({ ...input(), note: 'kept' } as ContributionInput);
    expect((extra as unknown as { note: string }).note).toBe('kept');
    // Helpers give identity fields first, then what they evaluated.
    const typeB = rectangular(identity, 3);
    expect(Object.keys(typeB)).toEqual([
      'key',
      'label',
      'unit',
      'sensitivity',
      'type',
      'distribution',
      'standardUncertainty',
      'dof',
      'contributionHz',
    ]);
    const shuffled = rectangular({ label: 'Reference', key: 'reference', unit: 'Hz', sensitivity: -2 }, 3);
    expect(Object.keys(shuffled).slice(0, 2)).toEqual(['label', 'key']);
    expect(shuffled).toEqual(typeB);
  });
});

describe('Type A evaluation (JCGM 100:2008 4.2.2, 4.2.3, G.3.3)', () => {
  it('from exactly two observations: u = s/sqrt(2), nu = 1', () => {
    const line = typeA(identity, 2, 2);
    expect(line.standardUncertainty).toBeCloseTo(Math.SQRT2, 15);
    expect(line.dof).toBe(1);
    expect(line.type).toBe('A');
    expect(line.distribution).toBe('t');
    expect(line.contributionHz).toBeCloseTo(2 * Math.SQRT2, 15);
  });

  it('refuses one observation or a count that is not a whole number', () => {
    // With n = 1 there is no experimental standard deviation (4.2.2 divides by n - 1).
    expect(() => typeA(identity, 2, 1)).toThrow(
      'reference: a Type A evaluation needs at least 2 observations (got 1)',
    );
    expect(() => typeA(identity, 2, 2.5)).toThrow(/at least 2 observations \(got 2.5\)/);
  });

  it('refuses a negative standard deviation', () => {
    expect(() => typeA(identity, -1, 4)).toThrow('reference: standard uncertainty must not be negative');
  });
});

describe('Type B evaluations (JCGM 100:2008 4.3.3, 4.3.7)', () => {
  it('rectangular: the half-width is a magnitude, nu infinite, distribution named', () => {
    const line = rectangular(identity, -3);
    expect(line.standardUncertainty).toBeCloseTo(Math.sqrt(3), 15);
    expect(line.type).toBe('B');
    expect(line.distribution).toBe('rectangular');
    expect(line.dof).toBe(Infinity);
    expect(() => rectangular(identity, NaN)).toThrow(
      'reference: half-width must be a finite number (got NaN)',
    );
  });

  it('from a certificate: u = U/k, normal, with the certificate degrees of freedom when given', () => {
    const line = normalFromCertificate(identity, 10, 2.5, 9);
    expect(line.standardUncertainty).toBe(4);
    expect(line.distribution).toBe('normal');
    expect(line.type).toBe('B');
    expect(line.dof).toBe(9);
    expect(normalFromCertificate(identity, -10, 2).standardUncertainty).toBe(5);
    expect(normalFromCertificate(identity, 10, 2).dof).toBe(Infinity);
  });

  it('refuses a coverage factor that is not a positive finite number, and a non-finite U', () => {
    for (const k of [0, -2, NaN, Infinity]) {
      expect(() => normalFromCertificate(identity, 10, k)).toThrow(
        `reference: coverage factor must be a positive number (got ${k})`,
      );
    }
    expect(() => normalFromCertificate(identity, Infinity, 2)).toThrow(
      'reference: expanded uncertainty must be a finite number (got Infinity)',
    );
  });
});

describe('combination and Welch-Satterthwaite (JCGM 100:2008 5.1.2, G.4.1 eq. G.2b, 6.2.1)', () => {
  const line = (key: 'reference' | 'repeatability' | 'setting', c: number, dof: number) =>
    makeContribution(input({ key, standardUncertainty: c, sensitivity: 1, dof }));

  it('worked by hand: c = 3 (nu = 4) and 4 (nu infinite) give u_c = 5, nu_eff = 625/20.25', () => {
    const b = combine([line('repeatability', 3, 4), line('reference', 4, Infinity)], 0.95);
    expect(b.combinedHz).toBe(5);
    expect(b.effectiveDof).toBeCloseTo(625 / 20.25, 12);
    expect(b.coverageProbability).toBe(0.95);
    expect(b.coverageFactor).toBe(coverageFactor(30, 0.95));
    expect(b.expandedHz).toBeCloseTo(5 * coverageFactor(30, 0.95), 12);
    expect(b.contributions).toHaveLength(2);
  });

  it('two equal lines with nu = 2 and nu = 100 give nu_eff = 4 / (1/2 + 1/100)', () => {
    const b = combine([line('repeatability', 1, 2), line('setting', 1, 100)]);
    expect(b.effectiveDof).toBeCloseTo(4 / 0.51, 12);
  });

  it('one line with nu = 1 keeps nu_eff = 1 exactly (never below the smallest nu_i)', () => {
    // Common practice: G.2b gives nu_eff = nu for a single line; round-off must not lower it.
    // These values of c make (c^2)^2 / c^4 come out just under 1 in binary arithmetic.
    for (const c of [1.1, 2.2, 3.3]) {
      const b = combine([line('repeatability', c, 1)], 0.95);
      expect(b.effectiveDof).toBe(1);
      expect(b.coverageFactor).toBe(coverageFactor(1, 0.95));
    }
  });

  it('a line that contributes nothing takes no part in nu_eff, even with fewer degrees of freedom', () => {
    // JCGM 100:2008 G.4.1 eq. (G.2b) sums (c_i u_i)^4 / nu_i: a zero term adds nothing, so its nu
    // cannot set the result; the single contributing line keeps nu_eff = 1 (and k = t_95(1)).
    const b = combine([line('repeatability', 1.1, 1), line('setting', 0, 0.5)], 0.95);
    expect(b.effectiveDof).toBe(1);
    expect(b.coverageFactor).toBe(coverageFactor(1, 0.95));
  });

  it('an empty budget has u_c = 0, U = 0 and nu_eff infinite', () => {
    const b = combine([]);
    expect(b.combinedHz).toBe(0);
    expect(b.expandedHz).toBe(0);
    expect(b.effectiveDof).toBe(Infinity);
    // Default coverage probability 95.45 % (k = 2 for nu infinite, JCGM 100:2008 6.2.2, Table G.1).
    expect(b.coverageFactor).toBeCloseTo(2, 3);
  });

  it('refuses a line whose contribution is not finite', () => {
    const bad = { ...line('setting', 1, 10), contributionHz: NaN };
    expect(() => combine([bad])).toThrow('setting: contribution must be a finite number (got NaN)');
  });

  it('copies the lines rather than keeping the caller array', () => {
    const lines = [line('setting', 1, 10)];
    const b = combine(lines);
    expect(b.contributions).not.toBe(lines);
    expect(b.contributions).toEqual(lines);
  });
});
