// One point from readings to verdict (app/engine/evaluate.ts), with hand-checkable numbers.
import { beforeEach, describe, expect, it } from 'vitest';
import { evaluatePoint } from '../../app/engine/evaluate';
import { toleranceHz } from '../../app/engine/conformity';
import { coverageFactor } from '../../app/engine/distributions';
import type { Conditions, Contribution, MeterSpec, PointInput, PointResult } from '../../app/engine/model';

const reference = { temperatureC: 20, pressureHpa: 1013.25, humidityPct: 50 };

// An X-band direct-reading brass meter, 0.1 % of reading, 1 MHz dial graduations, QL 2000.
const directSpec: MeterSpec = {
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

const warmBench: Conditions = {
  temperatureC: 23,
  temperatureUncertaintyC: 0.5,
  pressureHpa: 1013.25,
  pressureUncertaintyHpa: 1,
  humidityPct: 50,
  humidityUncertaintyPct: 5,
};

const directPoint: PointInput = {
  reference: { frequencyHz: 9.3e9, expandedUncertaintyPpm: 0.1, coverageFactor: 2 },
  readings: [
    { value: 9.302e9, direction: 'up' },
    { value: 9.303e9, direction: 'up' },
    { value: 9.302e9, direction: 'up' },
    { value: 9.304e9, direction: 'down' },
    { value: 9.305e9, direction: 'down' },
    { value: 9.304e9, direction: 'down' },
  ],
};

function line(result: PointResult, key: Contribution['key']): Contribution {
  const found = result.budget.contributions.find((c) => c.key === key);
  if (!found) throw new Error(`no ${key} line`);
  return found;
}

describe('direct-reading meter at 9.3 GHz, bench 3 K warm', () => {
  let r: PointResult;
  beforeEach(() => {
    r = evaluatePoint(directSpec, warmBench, directPoint, { kind: 'simple' });
  });

  it('means per direction and their mean', () => {
    // up: (9.302 + 9.303 + 9.302)/3 = 9.302333 GHz; down: 9.304333 GHz; mean 9.303333 GHz.
    expect(r.upMeanHz).toBeCloseTo(9.302333333e9, 0);
    expect(r.downMeanHz).toBeCloseTo(9.304333333e9, 0);
    expect(r.indicatedHz).toBeCloseTo(9.303333333e9, 0);
    expect(r.meanDial).toBe(r.indicatedHz);
  });

  it('correction: -57.0 ppm for expansion, 0 < |air| < 10 ppm, error = corrected - reference', () => {
    expect(r.thermalCorrectionPpm).toBeCloseTo(-56.9968, 4);
    // Only the temperature differs from reference; at constant 50 %RH, N rises with T
    // (dN/dT about +1.9 per K, ITU-R P.453-14), so 3 K adds ~6.3 N-units: correction about -6.3 ppm.
    expect(r.airCorrectionPpm).toBeCloseTo(-6.33, 1);
    const expected = r.indicatedHz * (1 + r.thermalCorrectionPpm * 1e-6) * (1 + r.airCorrectionPpm * 1e-6);
    expect(r.correctedHz).toBeCloseTo(expected, 0);
    expect(r.errorHz).toBeCloseTo(r.correctedHz - 9.3e9, 3);
    // 9.303333e9 (1 - 63.33e-6) = 9.302744e9: error about +2.744 MHz = +295 ppm.
    expect(r.errorHz / 1e6).toBeCloseTo(2.744, 2);
    expect(r.errorPpm).toBeCloseTo((r.errorHz / 9.3e9) * 1e6, 9);
  });

  it('has every budget line, with hand-checkable repeatability, hysteresis, resolution, setting, reference', () => {
    const keys = r.budget.contributions.map((c) => c.key);
    expect(keys).toEqual([
      'reference',
      'repeatability',
      'resolution',
      'hysteresis',
      'setting',
      'temperature',
      'expansion',
      'pressure',
      'humidity',
    ]);
    // Reference: 0.1 ppm (k = 2) of 9.3 GHz = 930 Hz expanded, 465 Hz standard, sensitivity -1.
    expect(line(r, 'reference').standardUncertainty).toBeCloseTo(465, 9);
    expect(line(r, 'reference').sensitivity).toBe(-1);
    // Repeatability: deviations (-1/3, 2/3, -1/3) MHz in each direction; pooled s^2 = (4/3 MHz^2)/4,
    // s = 577.35 kHz; u = s/sqrt(6) = 235.70 kHz; dof 6 - 2 = 4.
    const rep = line(r, 'repeatability');
    expect(rep.standardUncertainty).toBeCloseTo(1e6 / Math.sqrt(3) / Math.sqrt(6), 0);
    expect(rep.dof).toBe(4);
    expect(rep.type).toBe('A');
    // Resolution: half-width 0.5 MHz, u = 288.68 kHz.
    expect(line(r, 'resolution').standardUncertainty).toBeCloseTo(0.5e6 / Math.sqrt(3), 3);
    // Hysteresis: means differ by 2 MHz, half-width 1 MHz, u = 577.35 kHz.
    expect(line(r, 'hysteresis').standardUncertainty).toBeCloseTo(1e6 / Math.sqrt(3), 3);
    // Setting: half-width 0.1 * 9.303333 GHz / 2000 = 465.17 kHz.
    expect(line(r, 'setting').standardUncertainty).toBeCloseTo(
      (0.1 * r.indicatedHz) / 2000 / Math.sqrt(3),
      3,
    );
    // Indication lines pass through 1/g.
    expect(rep.sensitivity).toBeCloseTo(r.correctedHz / r.indicatedHz, 14);
  });

  it('combines the lines and expands with k from Welch-Satterthwaite', () => {
    const sumSquares = r.budget.contributions.reduce((s, c) => s + c.contributionHz ** 2, 0);
    expect(r.budget.combinedHz).toBeCloseTo(Math.sqrt(sumSquares), 6);
    const rep = line(r, 'repeatability');
    expect(r.budget.effectiveDof).toBeCloseTo(r.budget.combinedHz ** 4 / (rep.contributionHz ** 4 / 4), 6);
    expect(r.budget.coverageFactor).toBe(coverageFactor(r.budget.effectiveDof));
    expect(r.expandedPpm).toBeCloseTo((r.budget.expandedHz / 9.3e9) * 1e6, 9);
  });

  it('decides against 0.1 % of the corrected reading', () => {
    // "0.1 % of reading" = 1000 ppm: common practice for cavity meters.
    expect(r.decision.toleranceHz).toBeCloseTo(r.correctedHz / 1000, 3);
    expect(r.decision.verdict).toBe('pass');
    expect(r.decision.tur).toBeCloseTo(r.decision.toleranceHz / r.budget.expandedHz, 12);
    expect(r.notes).toEqual([]);
  });
});

describe('budget sensitivities by finite difference of the whole evaluation', () => {
  let base: PointResult;
  beforeEach(() => {
    base = evaluatePoint(directSpec, warmBench, directPoint, { kind: 'simple' });
  });
  const errorWith = (spec: MeterSpec, conditions: Conditions, point: PointInput = directPoint) =>
    evaluatePoint(spec, conditions, point, { kind: 'simple' }).errorHz;

  it('temperature, pressure, humidity, expansion coefficient', () => {
    const dT =
      (errorWith(directSpec, { ...warmBench, temperatureC: 23.01 }) -
        errorWith(directSpec, { ...warmBench, temperatureC: 22.99 })) /
      0.02;
    expect(line(base, 'temperature').sensitivity / dT).toBeCloseTo(1, 4);
    const dP =
      (errorWith(directSpec, { ...warmBench, pressureHpa: 1014.25 }) -
        errorWith(directSpec, { ...warmBench, pressureHpa: 1012.25 })) /
      2;
    expect(line(base, 'pressure').sensitivity / dP).toBeCloseTo(1, 4);
    const dH =
      (errorWith(directSpec, { ...warmBench, humidityPct: 51 }) -
        errorWith(directSpec, { ...warmBench, humidityPct: 49 })) /
      2;
    expect(line(base, 'humidity').sensitivity / dH).toBeCloseTo(1, 4);
    const dA =
      (errorWith({ ...directSpec, alphaPerK: 19.1e-6 }, warmBench) -
        errorWith({ ...directSpec, alphaPerK: 18.9e-6 }, warmBench)) /
      0.2e-6;
    expect(line(base, 'expansion').sensitivity / dA).toBeCloseTo(1, 4);
  });

  it('indication lines: shifting every reading by 1 kHz moves the error by 1 kHz / g', () => {
    const shifted = {
      ...directPoint,
      readings: directPoint.readings.map((x) => ({ ...x, value: x.value + 1e3 })),
    };
    const d = (errorWith(directSpec, warmBench, shifted) - base.errorHz) / 1e3;
    expect(line(base, 'resolution').sensitivity / d).toBeCloseTo(1, 5);
  });
});

// A divisions meter with a linear chart: 12 GHz at 0 div, -80 MHz per division, at reference
// conditions (so g = 1 and every number can be checked by hand).
const divisionsSpec: MeterSpec = {
  ...directSpec,
  dialKind: 'divisions',
  resolution: 0.01,
  chart: [0, 10, 20, 30, 40, 50].map((d) => ({ divisions: d, frequencyHz: 12e9 - 80e6 * d })),
};
const atReference: Conditions = { ...warmBench, temperatureC: 20 };
const divisionsPoint: PointInput = {
  reference: { frequencyHz: 9.3e9, expandedUncertaintyPpm: 0.1, coverageFactor: 2 },
  readings: [
    { value: 33.7, direction: 'up' },
    { value: 33.72, direction: 'up' },
    { value: 33.71, direction: 'up' },
    { value: 33.76, direction: 'down' },
    { value: 33.74, direction: 'down' },
    { value: 33.75, direction: 'down' },
  ],
};

describe('divisions meter through its chart', () => {
  let r: PointResult;
  beforeEach(() => {
    r = evaluatePoint(divisionsSpec, atReference, divisionsPoint, { kind: 'non-binary' });
  });

  it('means in divisions, frequency through the chart, no correction at reference conditions', () => {
    // up 33.71 div, down 33.75 div, mean 33.73 div -> 12 GHz - 80 MHz * 33.73 = 9.3016 GHz.
    expect(r.meanDial).toBeCloseTo(33.73, 12);
    expect(r.indicatedHz).toBeCloseTo(9.3016e9, 0);
    expect(r.upMeanHz).toBeCloseTo(12e9 - 80e6 * 33.71, 0);
    expect(r.downMeanHz).toBeCloseTo(12e9 - 80e6 * 33.75, 0);
    expect(r.thermalCorrectionPpm).toBe(0);
    expect(r.airCorrectionPpm).toBe(0);
    expect(r.errorHz).toBeCloseTo(1.6e6, 0);
    expect(r.errorPpm).toBeCloseTo((1.6e6 / 9.3e9) * 1e6, 6);
  });

  it('dial lines in divisions, converted by the chart slope', () => {
    const res = line(r, 'resolution');
    expect(res.unit).toBe('div');
    expect(res.standardUncertainty).toBeCloseTo(0.005 / Math.sqrt(3), 15);
    expect(res.sensitivity).toBeCloseTo(-80e6, 0);
    expect(res.contributionHz).toBeCloseTo((0.005 / Math.sqrt(3)) * 80e6, 3); // 230.94 kHz
    const rep = line(r, 'repeatability');
    // s in each direction is 0.01 div; pooled 0.01 div; u = 0.01/sqrt(6) div = 326.6 kHz.
    expect(rep.standardUncertainty).toBeCloseTo(0.01 / Math.sqrt(6), 12);
    expect(rep.contributionHz).toBeCloseTo((0.01 / Math.sqrt(6)) * 80e6, 1);
    // Hysteresis in Hz: 0.04 div * 80 MHz/div = 3.2 MHz apart, half-width 1.6 MHz.
    expect(line(r, 'hysteresis').standardUncertainty).toBeCloseTo(1.6e6 / Math.sqrt(3), 1);
    // At the reference temperature the expansion coefficient has no first-order effect.
    expect(Math.abs(line(r, 'expansion').sensitivity)).toBe(0);
  });

  it('non-binary decision against 0.1 % of the corrected reading', () => {
    expect(r.decision.toleranceHz).toBeCloseTo(toleranceHz(divisionsSpec, 9.3016e9), 3);
    expect(r.decision.toleranceHz).toBeCloseTo(9.3016e6, 3);
    expect(r.decision.guardBandHz).toBe(r.budget.expandedHz);
    const magnitude = Math.abs(r.errorHz);
    const expected = magnitude <= r.decision.toleranceHz - r.budget.expandedHz ? 'pass' : 'conditional-pass';
    expect(r.decision.verdict).toBe(expected);
  });

  it('refuses a reading off the chart, naming it', () => {
    const bad = {
      ...divisionsPoint,
      readings: [...divisionsPoint.readings, { value: 51, direction: 'up' as const }],
    };
    expect(() => evaluatePoint(divisionsSpec, atReference, bad, { kind: 'simple' })).toThrow(
      "point.readings[6]: 51 divisions is outside the chart's range 0 to 50 divisions",
    );
  });

  it('refuses a divisions meter without a chart', () => {
    expect(() =>
      evaluatePoint({ ...divisionsSpec, chart: undefined }, atReference, divisionsPoint, { kind: 'simple' }),
    ).toThrow(/needs a chart/);
  });
});

describe('fewer readings', () => {
  it('one direction only: no hysteresis line and a note', () => {
    const point = { ...directPoint, readings: directPoint.readings.filter((x) => x.direction === 'up') };
    const r = evaluatePoint(directSpec, warmBench, point, { kind: 'simple' });
    expect(r.downMeanHz).toBeNull();
    expect(r.budget.contributions.some((c) => c.key === 'hysteresis')).toBe(false);
    expect(r.notes).toContain('one direction only: hysteresis not evaluated');
    expect(line(r, 'repeatability').dof).toBe(2);
  });

  it('one reading per direction: repeatability from the range, rectangular, with a note', () => {
    const point = {
      ...directPoint,
      readings: [
        { value: 9.302e9, direction: 'up' as const },
        { value: 9.305e9, direction: 'down' as const },
      ],
    };
    const r = evaluatePoint(directSpec, warmBench, point, { kind: 'simple' });
    const rep = line(r, 'repeatability');
    expect(rep.distribution).toBe('rectangular');
    expect(rep.dof).toBe(Infinity);
    expect(rep.standardUncertainty).toBeCloseTo(3e6 / Math.sqrt(3), 3);
    expect(r.notes.some((n) => n.startsWith('one reading per direction'))).toBe(true);
    expect(r.budget.effectiveDof).toBe(Infinity);
  });
});

describe('tolerance', () => {
  it('is 0.1 % of reading plus the absolute term', () => {
    // "0.1 % of reading" = 1000 ppm: common practice for cavity meters (DESIGN.md section 1).
    expect(toleranceHz({ accuracyRelPpm: 1000, accuracyAbsHz: 0 }, 9.3e9)).toBe(9.3e6);
    expect(toleranceHz({ accuracyRelPpm: 1000, accuracyAbsHz: 2e6 }, 9.3e9)).toBe(11.3e6);
    expect(toleranceHz({ accuracyRelPpm: 500, accuracyAbsHz: 0 }, 35e9)).toBe(17.5e6);
  });
});

describe('defensive validation', () => {
  it('throws a clear error for non-finite inputs', () => {
    expect(() =>
      evaluatePoint(directSpec, { ...warmBench, temperatureC: Number.NaN }, directPoint, { kind: 'simple' }),
    ).toThrow('conditions.temperatureC must be a finite number (got NaN)');
    const badReading = {
      ...directPoint,
      readings: [{ value: Number.POSITIVE_INFINITY, direction: 'up' as const }],
    };
    expect(() => evaluatePoint(directSpec, warmBench, badReading, { kind: 'simple' })).toThrow(
      'point.readings[0].value must be a finite number',
    );
    expect(() =>
      evaluatePoint(directSpec, warmBench, { ...directPoint, readings: [] }, { kind: 'simple' }),
    ).toThrow(/at least one reading/);
    expect(() =>
      evaluatePoint({ ...directSpec, loadedQ: 0 }, warmBench, directPoint, { kind: 'simple' }),
    ).toThrow('spec.loadedQ must be positive');
  });
});
