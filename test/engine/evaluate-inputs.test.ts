// One check point's refusals and notes (app/engine/evaluate.ts): every bad input is refused with
// the field named, the value and what was expected (this product's rule for bad input), and the
// notes say what the evaluation could not do (one direction, one reading per direction, a
// reference outside the band, a low test uncertainty ratio: common practice).
import { describe, expect, it } from 'vitest';
import { evaluatePoint } from '../../app/engine/evaluate';
import type { Conditions, MeterSpec, PointInput } from '../../app/engine/model';

const reference = { temperatureC: 20, pressureHpa: 1013.25, humidityPct: 50 };
const spec: MeterSpec = {
  minHz: 8.2e9,
  maxHz: 12.4e9,
  dialKind: 'direct',
  accuracyRelPpm: 1000,
  accuracyAbsHz: 0,
  resolution: 1e6,
  alphaPerK: 19e-6,
  alphaUncertaintyPerK: 1e-6,
  reference,
  loadedQ: 2000,
  settingFraction: 0.1,
};
const bench: Conditions = {
  temperatureC: 20,
  temperatureUncertaintyC: 0.5,
  pressureHpa: 1013.25,
  pressureUncertaintyHpa: 1,
  humidityPct: 50,
  humidityUncertaintyPct: 5,
};
const point: PointInput = {
  reference: { frequencyHz: 9.3e9, expandedUncertaintyPpm: 0.1, coverageFactor: 2 },
  readings: [
    { value: 9.302e9, direction: 'up' },
    { value: 9.303e9, direction: 'up' },
    { value: 9.304e9, direction: 'down' },
    { value: 9.305e9, direction: 'down' },
  ],
};
const simple = { kind: 'simple' } as const;

type Case = [field: string, value: unknown, expected: 'finite' | 'positive' | 'not negative'];
const message = (field: string, value: unknown, expected: Case[2]) =>
  expected === 'finite'
    ? `${field} must be a finite number (got ${String(value)})`
    : expected === 'positive'
      ? `${field} must be positive (got ${String(value)})`
      : `${field} must not be negative (got ${String(value)})`;

function withField(path: string, value: unknown): { s: MeterSpec; c: Conditions; p: PointInput } {
  const s = structuredClone(spec) as unknown as Record<string, unknown>;
  const c = structuredClone(bench) as unknown as Record<string, unknown>;
  const p = structuredClone(point) as unknown as Record<string, unknown>;
  const [root, ...rest] = path.split('.');
  let target = root === 'spec' ? s : root === 'conditions' ? c : p;
  for (const key of rest.slice(0, -1)) target = target[key] as Record<string, unknown>;
  target[rest[rest.length - 1] as string] = value;
  return { s: s as unknown as MeterSpec, c: c as unknown as Conditions, p: p as unknown as PointInput };
}

describe('refusals name the field, the value and what was expected', () => {
  const cases: Case[] = [
    ['spec.minHz', 0, 'positive'],
    ['spec.minHz', NaN, 'finite'],
    ['spec.maxHz', -1, 'positive'],
    ['spec.accuracyRelPpm', -1, 'not negative'],
    ['spec.accuracyAbsHz', -1, 'not negative'],
    ['spec.accuracyAbsHz', Infinity, 'finite'],
    ['spec.resolution', -0.5, 'not negative'],
    ['spec.alphaPerK', NaN, 'finite'],
    ['spec.alphaUncertaintyPerK', -1e-6, 'not negative'],
    ['spec.reference.temperatureC', Infinity, 'finite'],
    ['spec.reference.pressureHpa', 0, 'positive'],
    ['spec.reference.humidityPct', -1, 'not negative'],
    ['spec.loadedQ', 0, 'positive'],
    ['spec.settingFraction', -0.1, 'not negative'],
    ['conditions.temperatureC', NaN, 'finite'],
    ['conditions.temperatureUncertaintyC', -0.1, 'not negative'],
    ['conditions.pressureHpa', 0, 'positive'],
    ['conditions.pressureUncertaintyHpa', -1, 'not negative'],
    ['conditions.humidityPct', -1, 'not negative'],
    ['conditions.humidityUncertaintyPct', -1, 'not negative'],
    ['point.reference.frequencyHz', 0, 'positive'],
    ['point.reference.expandedUncertaintyPpm', -0.1, 'not negative'],
    ['point.reference.coverageFactor', 0, 'positive'],
    ['spec.minHz', '9e9', 'finite'],
  ];
  for (const [field, value, expected] of cases) {
    it(`${field} = ${String(value)}: must be ${expected}`, () => {
      const { s, c, p } = withField(field, value);
      expect(() => evaluatePoint(s, c, p, simple)).toThrow(message(field, value, expected));
    });
  }

  it('accepts zero where zero is allowed (uncertainties, tolerances, resolution, humidity 0 and 100 %)', () => {
    for (const [field, value] of [
      ['spec.accuracyAbsHz', 0],
      ['spec.resolution', 0],
      ['spec.alphaUncertaintyPerK', 0],
      ['spec.settingFraction', 0],
      ['conditions.temperatureUncertaintyC', 0],
      ['conditions.humidityPct', 0],
      ['conditions.humidityPct', 100],
      ['point.reference.expandedUncertaintyPpm', 0],
      ['spec.alphaPerK', -5e-6],
    ] as const) {
      const { s, c, p } = withField(field, value);
      expect(() => evaluatePoint(s, c, p, simple)).not.toThrow();
    }
  });

  it('refuses a relative humidity above 100 %', () => {
    const { s, c, p } = withField('conditions.humidityPct', 100.5);
    expect(() => evaluatePoint(s, c, p, simple)).toThrow(
      'conditions.humidityPct must not exceed 100 (got 100.5)',
    );
  });

  it('refuses an unknown dial kind, no readings, a bad reading value or direction', () => {
    const badKind = withField('spec.dialKind', 'vernier');
    expect(() => evaluatePoint(badKind.s, badKind.c, badKind.p, simple)).toThrow(
      "spec.dialKind must be 'direct' or 'divisions' (got vernier)",
    );
    expect(() => evaluatePoint(spec, bench, { ...point, readings: [] }, simple)).toThrow(
      'point.readings: at least one reading is needed',
    );
    const readings = [...point.readings, { value: NaN, direction: 'up' as const }];
    expect(() => evaluatePoint(spec, bench, { ...point, readings }, simple)).toThrow(
      'point.readings[4].value must be a finite number (got NaN)',
    );
    const sideways = [...point.readings, { value: 9.3e9, direction: 'sideways' as 'up' }];
    expect(() => evaluatePoint(spec, bench, { ...point, readings: sideways }, simple)).toThrow(
      "point.readings[4].direction must be 'up' or 'down' (got sideways)",
    );
  });

  it('refuses a divisions meter without a chart', () => {
    expect(() => evaluatePoint({ ...spec, dialKind: 'divisions' }, bench, point, simple)).toThrow(
      'spec.chart: a divisions meter needs a chart',
    );
  });
});

describe('notes: what the evaluation could not do', () => {
  it('two readings per direction at reference conditions: no notes, the mean of the direction means', () => {
    const r = evaluatePoint(spec, bench, point, simple);
    expect(r.notes).toEqual([]);
    expect(r.upMeanHz).toBe(9.3025e9);
    expect(r.downMeanHz).toBe(9.3045e9);
    expect(r.indicatedHz).toBe(9.3035e9);
    // At the reference conditions the correction is nil: the error is the indication minus the reference.
    expect(r.errorHz).toBeCloseTo(3.5e6, 0);
    expect(r.errorPpm).toBeCloseTo((r.errorHz / 9.3e9) * 1e6, 9);
    expect(r.expandedPpm).toBeCloseTo((r.budget.expandedHz / 9.3e9) * 1e6, 9);
    expect(r.budget.contributions.map((c) => c.key)).toContain('hysteresis');
    // Repeatability: pooled s with n - D = 2 degrees of freedom, u = s / sqrt(n) for equal counts
    // (JCGM 100:2008 4.2.3 with the pooled variance of H.3.6, from memory).
    const rep = r.budget.contributions.find((c) => c.key === 'repeatability')!;
    expect(rep.dof).toBe(2);
    expect(rep.standardUncertainty).toBeCloseTo(Math.sqrt(0.5e12) / 2, 3);
    expect(rep.label).toBe('Repeatability (pooled s = 7.07e+5 Hz, 4 readings)');
  });

  it('one direction only: no hysteresis line, and a note says so', () => {
    const up = point.readings.filter((r) => r.direction === 'up');
    const r = evaluatePoint(spec, bench, { ...point, readings: up }, simple);
    expect(r.notes).toContain('one direction only: hysteresis not evaluated');
    expect(r.downMeanHz).toBe(null);
    expect(r.budget.contributions.map((c) => c.key)).not.toContain('hysteresis');
    const down = point.readings.filter((r) => r.direction === 'down');
    const d = evaluatePoint(spec, bench, { ...point, readings: down }, simple);
    expect(d.upMeanHz).toBe(null);
    expect(d.notes).toContain('one direction only: hysteresis not evaluated');
  });

  it('one reading per direction: repeatability from the range as a rectangular half-width (JCGM 100:2008 4.3.7)', () => {
    const readings = [
      { value: 9.302e9, direction: 'up' as const },
      { value: 9.305e9, direction: 'down' as const },
    ];
    const r = evaluatePoint(spec, bench, { ...point, readings }, simple);
    expect(r.notes).toContain(
      'one reading per direction: repeatability taken as rectangular with the range of the readings as half-width (no Type A evaluation possible)',
    );
    const rep = r.budget.contributions.find((c) => c.key === 'repeatability')!;
    expect(rep.distribution).toBe('rectangular');
    expect(rep.standardUncertainty).toBeCloseTo(3e6 / Math.sqrt(3), 3);
    const hys = r.budget.contributions.find((c) => c.key === 'hysteresis')!;
    expect(hys.standardUncertainty).toBeCloseTo(1.5e6 / Math.sqrt(3), 3);
  });

  it('a reference outside the stated band is noted, not refused', () => {
    const below = evaluatePoint({ ...spec, minHz: 9.31e9 }, bench, point, simple);
    expect(below.notes).toContain("reference frequency lies outside the meter's stated band");
    const above = evaluatePoint({ ...spec, maxHz: 9.29e9 }, bench, point, simple);
    expect(above.notes).toContain("reference frequency lies outside the meter's stated band");
    const onEdges = evaluatePoint({ ...spec, minHz: 9.3e9, maxHz: 9.3e9 }, bench, point, simple);
    expect(onEdges.notes).toEqual([]);
  });

  it('a test uncertainty ratio below 4 is noted with its value (common practice: TUR >= 4)', () => {
    const tight = evaluatePoint({ ...spec, accuracyRelPpm: 200 }, bench, point, simple);
    expect(tight.decision.tur).toBeLessThan(4);
    expect(tight.notes).toContain(`test uncertainty ratio ${tight.decision.tur.toFixed(2)} is below 4`);
  });

  it('decides with the rule asked for and the tolerance of the corrected reading', () => {
    const r = evaluatePoint(spec, bench, point, { kind: 'non-binary' });
    expect(r.decision.rule).toEqual({ kind: 'non-binary' });
    expect(r.decision.guardBandHz).toBe(r.budget.expandedHz);
    expect(r.decision.toleranceHz).toBeCloseTo(r.correctedHz / 1000, 3);
  });
});
