// The interval methods' rules at their edges: policy bounds met exactly, the staircase's steps,
// the alert zone, the variables-data method over several frequencies, and the attributes method
// with its binomial test. Sources beside each check: NCSL International RP-1 (exponential
// reliability), ILAC-G24 / OIML D 10 method 1 (staircase), JCGM 106:2012 with e-Handbook 4.5.1.2
// (variables data), or the lab's policy (common practice).
import { describe, expect, it } from 'vitest';
import { fitLine, predict } from '../../app/engine/drift';
import {
  applyAlertZone,
  applyPolicy,
  binomialTest,
  exponentialInterval,
  exponentialLogLikelihood,
  fitExponentialReliability,
  predictedConformity,
  suggestByAttributes,
  suggestByStaircase,
  suggestByVariables,
  variablesInterval,
  type AttributeRecord,
  type IntervalSuggestion,
  type VariablesFrequency,
} from '../../app/engine/intervals';
import { probabilityInInterval } from '../../app/engine/conformity';

const policy = { minMonths: 6, maxMonths: 36 };
const ghz = (hz: number) => `${hz / 1e9} GHz`;

/** A frequency whose error drifts from `now` ppm at the last check (t = 0) by `perYear`. */
function drifting(
  frequencyHz: number,
  now: number,
  perYear: number,
  tolerancePpm = 1000,
): VariablesFrequency {
  const pts = [-4, -3, -2, -1, 0].map((t, i) => ({ x: t, y: now + perYear * t + (i % 2 ? 2 : -2), u: 5 }));
  return { frequencyHz, fit: fitLine(pts, 'residual-or-stated'), tolerancePpm, uNewPpm: 5 };
}

function records(spec: Array<[interval: number, n: number, inTolerance: number]>): AttributeRecord[] {
  const out: AttributeRecord[] = [];
  for (const [interval, n, x] of spec) for (let i = 0; i < n; i++) out.push({ interval, inTolerance: i < x });
  return out;
}

describe('policy bounds (the lab policy: whole months, rounded down, within [min, max])', () => {
  it('keeps a result exactly at the minimum or the maximum, unbounded', () => {
    expect(applyPolicy(6, policy)).toEqual({ months: 6, boundedBy: null });
    expect(applyPolicy(36, policy)).toEqual({ months: 36, boundedBy: null });
    expect(applyPolicy(5.99, policy)).toEqual({ months: 6, boundedBy: 'minimum' });
    expect(applyPolicy(37, policy)).toEqual({ months: 36, boundedBy: 'maximum' });
  });

  it('counts a month total that is whole up to rounding as whole', () => {
    expect(applyPolicy(12 - 1e-12, policy).months).toBe(12);
    expect(applyPolicy(12 - 1e-6, policy).months).toBe(11);
  });

  it('refuses a policy without 1 <= minimum <= maximum', () => {
    expect(() => applyPolicy(12, { minMonths: 0, maxMonths: 12 })).toThrow(
      'interval policy: need 1 <= minimum <= maximum',
    );
    expect(() => applyPolicy(12, { minMonths: 12, maxMonths: 11 })).toThrow(/1 <= minimum <= maximum/);
    expect(() => applyPolicy(12, { minMonths: NaN, maxMonths: 11 })).toThrow(/1 <= minimum <= maximum/);
    expect(applyPolicy(12, { minMonths: 1, maxMonths: 1 })).toEqual({ months: 1, boundedBy: 'maximum' });
  });
});

describe('simple staircase (ILAC-G24 / OIML D 10 method 1; step sizes are the lab choice)', () => {
  it('keeps the present interval until the first as-found result', () => {
    const s = suggestByStaircase(null, 12, policy, 'Method 1.');
    expect(s.months).toBe(12);
    expect(s.change).toBe('same');
    expect(s.reason).toBe(
      'Method 1. No as-found result yet: the present interval stands until the first check.',
    );
    expect(s.rationale).toBe(
      `Keep the present 12-month interval. Method: ${s.methodName}. Method 1. No as-found result yet: the present interval stands until the first check.`,
    );
    expect(s.method).toBe('staircase');
    expect(s.currentMonths).toBe(12);
  });

  it('halves the interval when found out of tolerance, not below the minimum', () => {
    const s = suggestByStaircase({ inTolerance: false, worstUsedFraction: 1.3 }, 12, policy, '');
    expect(s.months).toBe(6);
    expect(s.unboundedMonths).toBe(6);
    expect(s.change).toBe('shorter');
    expect(s.reason).toMatch(/out of tolerance, so the interval is shortened to 50 % of the present one\.$/);
    expect(s.rationale).toMatch(/^Suggested interval 6 months \(now 12\)\./);
    const atMinimum = suggestByStaircase({ inTolerance: false, worstUsedFraction: 1.3 }, 8, policy, '');
    expect(atMinimum.months).toBe(6);
    expect(atMinimum.boundedBy).toBe('minimum');
    expect(atMinimum.reason).toMatch(
      /This is below the lab's minimum, so the minimum of 6 months applies\.$/,
    );
  });

  it('lengthens by 25 % when in tolerance using exactly half of it or less', () => {
    const s = suggestByStaircase({ inTolerance: true, worstUsedFraction: 0.5 }, 12, policy, '');
    expect(s.months).toBe(15);
    expect(s.change).toBe('longer');
    expect(s.reason).toMatch(/using at most 50 % of it, so the interval is lengthened by 25 %\.$/);
    const atMaximum = suggestByStaircase({ inTolerance: true, worstUsedFraction: 0.2 }, 32, policy, '');
    expect(atMaximum.months).toBe(36);
    expect(atMaximum.boundedBy).toBe('maximum');
    expect(atMaximum.reason).toMatch(/ The lab's maximum of 36 months applies\.$/);
  });

  it('keeps the interval when in tolerance using more than half, or an unknown part', () => {
    const more = suggestByStaircase({ inTolerance: true, worstUsedFraction: 0.51 }, 12, policy, '');
    expect(more.months).toBe(12);
    expect(more.reason).toMatch(/in tolerance but using 51 % of it, so the interval is kept\.$/);
    const unknown = suggestByStaircase({ inTolerance: true, worstUsedFraction: null }, 12, policy, '');
    expect(unknown.months).toBe(12);
    expect(unknown.reason).toMatch(/using an unknown part of it, so the interval is kept\.$/);
  });
});

describe('alert zone (the lab policy: 80 % of the tolerance used and not adjusted)', () => {
  const longer: IntervalSuggestion = suggestByStaircase(
    { inTolerance: true, worstUsedFraction: 0.2 },
    12,
    policy,
    '',
  );

  it('does nothing without a result, after an adjustment, with an unknown or a smaller use', () => {
    for (const newest of [
      null,
      { worstUsedFraction: 0.9, adjusted: true },
      { worstUsedFraction: null, adjusted: false },
      { worstUsedFraction: 0.79, adjusted: false },
    ]) {
      const a = applyAlertZone(longer, newest, policy);
      expect(a.alert).toBe(false);
      expect(a.months).toBe(15);
    }
  });

  it('at exactly 80 % halves the present interval and says why', () => {
    const a = applyAlertZone(longer, { worstUsedFraction: 0.8, adjusted: false }, policy);
    expect(a.alert).toBe(true);
    expect(a.months).toBe(6);
    expect(a.boundedBy).toBe(null);
    expect(a.change).toBe('shorter');
    expect(a.reason).toBe(
      `The ${longer.methodName} alone gives 15 months: ${longer.reason} But the last check found the meter using 80 % of its tolerance, at or above the lab's alert level of 80 %, and it was not adjusted: adjust it, or shorten the interval to 50 % of the present one (the ILAC-G24 / OIML D 10 method 1 step) so that a check comes before what is left of the tolerance is used up.`,
    );
    expect(a.rationale).toBe(`Suggested interval 6 months (now 12). ${a.reason}`);
  });

  it('names an out-of-tolerance finding as such; exactly 100 % is still in tolerance', () => {
    const a = applyAlertZone(longer, { worstUsedFraction: 1.2, adjusted: false }, policy);
    expect(a.reason).toMatch(
      /found the meter out of tolerance \(120 % of its tolerance\) and it was not adjusted/,
    );
    // A result on the limit has not passed beyond it (conformity.ts, ILAC-G8:09/2019 4.2.1).
    const onLimit = applyAlertZone(longer, { worstUsedFraction: 1, adjusted: false }, policy);
    expect(onLimit.reason).toMatch(/found the meter using 100 % of its tolerance, at or above/);
  });

  it('keeps a method result that is already shorter, and flags it', () => {
    const short = suggestByStaircase({ inTolerance: false, worstUsedFraction: 1.2 }, 20, policy, '');
    const a = applyAlertZone(short, { worstUsedFraction: 1.2, adjusted: false }, policy);
    expect(a.alert).toBe(true);
    expect(a.months).toBe(10);
    expect(a.reason).toBe(short.reason);
  });

  it('within the policy bounds: the minimum when halving goes below it, "same" or "longer" against the present', () => {
    const six = applyAlertZone(
      suggestByStaircase({ inTolerance: true, worstUsedFraction: 0.2 }, 6, policy, ''),
      { worstUsedFraction: 0.9, adjusted: false },
      policy,
    );
    expect(six.months).toBe(6);
    expect(six.boundedBy).toBe('minimum');
    expect(six.change).toBe('same');
    // A present interval under the lab's minimum (set before the policy): the minimum is longer.
    const four = applyAlertZone(
      { ...longer, currentMonths: 4 },
      { worstUsedFraction: 0.9, adjusted: false },
      policy,
    );
    expect(four.months).toBe(6);
    expect(four.change).toBe('longer');
  });
});

describe('variables-data method (JCGM 106:2012 7 with the e-Handbook 4.5.1.2 prediction)', () => {
  it('p_c of a future check is the normal probability inside +-T with the prediction mean and sigma_p', () => {
    const f = drifting(1e10, 800, 100);
    const p = predict(f.fit, 1.5, 0.95, 5);
    expect(predictedConformity(f, 1.5)).toBe(probabilityInInterval(-1000, 1000, p.value, p.sdPrediction));
    // A larger uncertainty of the future check widens sigma_p and lowers p_c near the limit.
    expect(predictedConformity({ ...f, uNewPpm: 50 }, 1.5)).toBeLessThan(predictedConformity(f, 1.5));
  });

  it('refuses an empty list of frequencies', () => {
    expect(() => variablesInterval([], 0, 0.95, 12)).toThrow('variables-data method: no fitted frequency');
  });

  it('is limited by the frequency whose p_c falls first', () => {
    const slow = drifting(9e9, 200, 50);
    const fast = drifting(1e10, 800, 100);
    const both = variablesInterval([slow, fast], 0, 0.95, 48);
    const alone = variablesInterval([fast], 0, 0.95, 48);
    expect(both.months).toBe(alone.months);
    expect(both.limitingFrequencyHz).toBe(1e10);
    expect(variablesInterval([fast, slow], 0, 0.95, 48).limitingFrequencyHz).toBe(1e10);
    expect(both.conformityAtEnd).toBe(alone.conformityAtEnd);
    expect(both.conformityAfter).toBe(alone.conformityAfter);
  });

  it('gives 0 months when already below the target at the last check', () => {
    const out = drifting(1e10, 990, 100);
    const r = variablesInterval([out], 0, 0.95, 48);
    expect(r).toEqual({
      months: 0,
      limitingFrequencyHz: 1e10,
      conformityAtEnd: predictedConformity(out, 0),
      conformityAfter: null,
    });
    const s = suggestByVariables([out], 0, 0.95, 12, policy, ghz);
    expect(s.months).toBe(6);
    expect(s.boundedBy).toBe('minimum');
    expect(s.reason).toMatch(
      /predicts a probability of conformity below the target of 95\.0 % already at the last check \(\d+\.\d % at 10 GHz\)\./,
    );
  });

  it('runs to the maximum when the target holds throughout, and the policy maximum applies', () => {
    const steady = drifting(1e10, 0, 1);
    const r = variablesInterval([steady], 0, 0.95, 24);
    expect(r.months).toBe(24);
    expect(r.conformityAfter).toBe(null);
    expect(r.limitingFrequencyHz).toBe(1e10);
    expect(r.conformityAtEnd).toBe(predictedConformity(steady, 2));
    const s = suggestByVariables([steady], 0, 0.95, 12, policy, ghz);
    expect(s.unboundedMonths).toBe(Infinity);
    expect(s.months).toBe(36);
    expect(s.boundedBy).toBe('maximum');
    expect(s.reason).toMatch(
      /keeps the predicted probability of conformity at or above the target of 95\.0 % for at least 37 months \(lowest \d+\.\d %, at 10 GHz\)\./,
    );
  });

  it('a p_c exactly at the target meets it (p_c >= target), at the last check and at a month end', () => {
    const f = drifting(1e10, 800, 100);
    const atStart = variablesInterval([f], 0, predictedConformity(f, 0), 48);
    expect(atStart.months).toBeGreaterThan(0);
    const free = variablesInterval([f], 0, 0.95, 48);
    const m = free.months;
    const exactly = variablesInterval([f], 0, predictedConformity(f, m / 12), 48);
    expect(exactly.months).toBe(m);
    expect(exactly.conformityAtEnd).toBe(predictedConformity(f, m / 12));
  });

  it('states the month after the interval and the p_c it falls to', () => {
    const f = drifting(1e10, 800, 100);
    const s = suggestByVariables([f], 0, 0.95, 12, policy, ghz);
    expect(s.detail.conformityAfter).not.toBeNull();
    expect(s.reason).toMatch(
      new RegExp(
        `for ${s.months} months; a month later it falls to ${((s.detail.conformityAfter as number) * 100).toFixed(1)} % at 10 GHz\\.`,
      ),
    );
    expect(s.detail.conformityAtEnd).toBeGreaterThanOrEqual(0.95);
  });
});

describe('attributes method: exponential reliability (NCSL International RP-1)', () => {
  it('one resubmission interval: lambda = -ln(x/n)/t, u(lambda) by the delta method', () => {
    // Common statistics: with one interval t the ML reliability is R = x/n, so lambda = -ln(R)/t;
    // var(R) = R(1 - R)/n gives u(lambda) = sqrt((1 - R)/(n R)) / t.
    const recs = records([[2, 10, 8]]);
    const fit = fitExponentialReliability(recs);
    expect(fit.n).toBe(10);
    expect(fit.inTolerance).toBe(8);
    expect(fit.lambda).toBeCloseTo(Math.log(10 / 8) / 2, 10);
    expect(fit.uLambda as number).toBeCloseTo(Math.sqrt(0.2 / 8) / 2, 10);
    expect(fit.logLikelihood).toBeCloseTo(8 * Math.log(0.8) + 2 * Math.log(0.2), 10);
    expect(exponentialLogLikelihood(recs, fit.lambda)).toBe(fit.logLikelihood);
  });

  it('a history with every result in tolerance sets no limit; none in tolerance an infinite rate', () => {
    expect(fitExponentialReliability(records([[1, 5, 5]]))).toEqual({
      lambda: 0,
      uLambda: null,
      n: 5,
      inTolerance: 5,
      logLikelihood: 0,
    });
    expect(fitExponentialReliability(records([[1, 5, 0]]))).toEqual({
      lambda: Infinity,
      uLambda: null,
      n: 5,
      inTolerance: 0,
      logLikelihood: 0,
    });
    expect(exponentialInterval(0, 0.95)).toBe(Infinity);
  });

  it('refuses no results, and an interval that is not positive and finite', () => {
    expect(() => fitExponentialReliability([])).toThrow('attributes method: no results');
    for (const bad of [0, -1, NaN, Infinity]) {
      expect(() => fitExponentialReliability([{ interval: bad, inTolerance: true }])).toThrow(
        `attributes method: every interval must be positive (got ${bad})`,
      );
    }
  });

  it('interval = -ln(R*)/lambda, for a target strictly between 0 and 1', () => {
    expect(exponentialInterval(0.1, 0.9)).toBeCloseTo(-Math.log(0.9) / 0.1, 12);
    for (const bad of [0, 1, 1.5, NaN]) {
      expect(() => exponentialInterval(0.1, bad)).toThrow('reliability target must lie between 0 and 1');
    }
  });
});

describe('binomial test of the observed reliability (exact, two-sided by doubling the smaller tail)', () => {
  // Common practice: the exact binomial test; tails computed by hand from the binomial pmf.
  it('a meter doing better than the target: 20 of 20 against 0.8 gives p = 2 x 0.8^20', () => {
    const t = binomialTest(20, 20, 0.8);
    expect(t.pValue).toBeCloseTo(2 * 0.8 ** 20, 12);
    expect(t.significant).toBe(true);
    expect(t.observed).toBe(1);
    expect(t.target).toBe(0.8);
    expect(t.alpha).toBe(0.05);
    expect(t.n).toBe(20);
    expect(t.successes).toBe(20);
  });

  it('none in tolerance: 0 of 5 against 0.5 gives p = 2 x 0.5^5 = 0.0625, not significant at 5 %', () => {
    const t = binomialTest(0, 5, 0.5);
    expect(t.pValue).toBeCloseTo(0.0625, 12);
    expect(t.significant).toBe(false);
    expect(binomialTest(0, 5, 0.5, 0.1).significant).toBe(true);
  });

  it('caps the two-sided p-value at 1 (10 of 20 against 0.5)', () => {
    expect(binomialTest(10, 20, 0.5).pValue).toBe(1);
  });

  it('refuses counts that are not whole numbers with 0 <= successes <= n, n >= 1', () => {
    for (const [x, n] of [
      [0, 0],
      [3, 2],
      [-1, 4],
      [1.5, 4],
      [1, 4.5],
    ] as const) {
      expect(() => binomialTest(x, n, 0.9)).toThrow(
        'binomial test: need whole numbers 0 <= successes <= n, n >= 1',
      );
    }
  });
});

describe('attributes method suggestion (NCSL International RP-1; the test window is the lab choice)', () => {
  it('all in tolerance at the present interval, consistent with the target: the interval stands', () => {
    const s = suggestByAttributes(records([[1, 20, 20]]), 0.95, 12, policy, 'this meter');
    expect(s.fit.lambda).toBe(0);
    expect(s.test?.n).toBe(20);
    expect(s.test?.significant).toBe(false);
    expect(s.months).toBe(12);
    expect(s.change).toBe('same');
    expect(s.reason).toBe(
      `None of 20 as-found results of this meter was out of tolerance, so the exponential model sets no limit. At about the present interval 20 of 20 were in tolerance (100.0 %); the binomial test does not show this differs from the target (p = ${s.test?.pValue.toFixed(3)}), so the interval is not changed.`,
    );
  });

  it('half found out at the present interval: the fitted model decides, bounded by the minimum', () => {
    const s = suggestByAttributes(records([[1, 10, 5]]), 0.95, 12, policy, 'the group');
    expect(s.fit.lambda).toBeCloseTo(Math.log(2), 8);
    expect(s.test?.significant).toBe(true);
    expect(s.unboundedMonths).toBeCloseTo((-Math.log(0.95) / Math.log(2)) * 12, 6);
    expect(s.months).toBe(6);
    expect(s.boundedBy).toBe('minimum');
    expect(s.reason).toMatch(
      /^5 of 10 as-found results of the group were out of tolerance; the fitted failure rate is 0\.6931 per year, which reaches the target of 95\.0 % at 0\.9 months\. At about the present interval 5 of 10 were in tolerance \(50\.0 %\), which differs from the target \(binomial test p = 0\.000\)\./,
    );
  });

  it('counts results within 25 % of the present interval as at it, and no further', () => {
    const at = suggestByAttributes(records([[1.25, 10, 9]]), 0.95, 12, policy, 'x');
    expect(at.test?.n).toBe(10);
    const beyond = suggestByAttributes(records([[1.26, 10, 9]]), 0.95, 12, policy, 'x');
    expect(beyond.test).toBe(null);
    const below = suggestByAttributes(records([[0.75, 10, 9]]), 0.95, 12, policy, 'x');
    expect(below.test?.n).toBe(10);
  });

  it('without results near the present interval the fitted model decides', () => {
    const s = suggestByAttributes(records([[3, 10, 9]]), 0.95, 12, policy, 'x');
    const months = (-Math.log(0.95) / (Math.log(10 / 9) / 3)) * 12;
    expect(s.unboundedMonths).toBeCloseTo(months, 6);
    expect(s.months).toBe(Math.floor(months));
    expect(s.change).toBe('longer');
    expect(s.reason).toMatch(
      / No results at about the present interval to test; the fitted model decides\.$/,
    );
  });
});
