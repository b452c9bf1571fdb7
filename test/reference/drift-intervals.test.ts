// Outside-source checks of the history engine (drift.ts, intervals.ts). The source is named
// beside each check.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { beforeEach, describe, expect, it } from 'vitest';
import { fitLine, predict, projectedExit } from '../../app/engine/drift';
import {
  METHOD_NAMES,
  binomialTest,
  exponentialInterval,
  exponentialLogLikelihood,
  fitExponentialReliability,
  type AttributeRecord,
} from '../../app/engine/intervals';
import { tQuantile } from '../../app/engine/distributions';

const DATA = path.resolve(import.meta.dirname, '../data');

function relErr(a: number, b: number): number {
  return Math.abs(a - b) / Math.abs(b);
}

/** Columns "y x" after the comment lines. */
function norris(): { x: number; y: number }[] {
  return readFileSync(path.join(DATA, 'nist-strd/Norris.txt'), 'utf8')
    .split('\n')
    .filter((l) => l.trim() && !l.startsWith('#'))
    .map((l) => {
      const [y, x] = l.trim().split(/\s+/).map(Number);
      return { x: x as number, y: y as number };
    });
}

describe('straight-line fit: NIST StRD linear regression dataset Norris (certified values)', () => {
  // Computed before each test, not at collection: an engine change that throws must fail a test,
  // and the mutation run must see which test reached which code.
  let pts: { x: number; y: number }[] = [];
  let fit: ReturnType<typeof fitLine>;
  beforeEach(() => {
    pts = norris();
    fit = fitLine(pts); // equal weights, scale from the residuals, as the certified values
  });

  it('has the 36 observations of the dataset', () => {
    expect(pts).toHaveLength(36);
    expect(fit.dof).toBe(34);
  });

  it('reproduces B1, B0, their standard deviations and the residual SD to at least 9 significant digits', () => {
    // Certified values, NIST StRD "Norris" (file header in test/data/nist-strd/Norris.txt).
    expect(relErr(fit.slope, 1.00211681802045)).toBeLessThan(1e-9);
    expect(relErr(fit.intercept, -0.262323073774029)).toBeLessThan(1e-9);
    expect(relErr(fit.uSlope, 0.429796848199937e-3)).toBeLessThan(1e-9);
    expect(relErr(fit.uIntercept, 0.232818234301152)).toBeLessThan(1e-9);
    expect(relErr(fit.residualSd, 0.884796396144373)).toBeLessThan(1e-9);
  });

  it('gives the same line whatever the common weight (weights only set relative importance)', () => {
    const w = fitLine(pts.map((p) => ({ ...p, u: 3.7 })));
    expect(relErr(w.slope, 1.00211681802045)).toBeLessThan(1e-9);
    expect(relErr(w.uSlope, 0.429796848199937e-3)).toBeLessThan(1e-9);
  });
});

describe('prediction interval: NIST/SEMATECH e-Handbook 4.5.1.2 (single new observation)', () => {
  // y0 +- t(1 - a/2, n - 2) sigma_p, sigma_p^2 = sigma^2 + sigma_f^2,
  // sigma_f^2 = sigma^2 (1/n + (x0 - xbar)^2 / Sxx); the same closed form as Montgomery, Peck &
  // Vining, Introduction to Linear Regression Analysis, eq. 2.45. Computed here from the Norris
  // certified residual SD and the data, independently of the fit's matrix terms.
  const pts = norris();
  const n = pts.length;
  const xbar = pts.reduce((s, p) => s + p.x, 0) / n;
  const sxx = pts.reduce((s, p) => s + (p.x - xbar) ** 2, 0);
  const sigma = 0.884796396144373;
  let fit: ReturnType<typeof fitLine>;
  beforeEach(() => {
    fit = fitLine(pts);
  });

  for (const x0 of [0, 500, 1200]) {
    it(`matches the closed form at x0 = ${x0}`, () => {
      const p = predict(fit, x0, 0.95);
      const sigmaF = sigma * Math.sqrt(1 / n + (x0 - xbar) ** 2 / sxx);
      const sigmaP = Math.sqrt(sigma ** 2 + sigmaF ** 2);
      expect(relErr(p.value, -0.262323073774029 + 1.00211681802045 * x0)).toBeLessThan(1e-9);
      expect(relErr(p.sdMean, sigmaF)).toBeLessThan(1e-9);
      expect(relErr(p.sdPrediction, sigmaP)).toBeLessThan(1e-9);
      // t(0.975, 34) = 2.0322445 (Student's t table, from memory; checked through @stdlib here).
      expect(p.k).toBeCloseTo(2.0322445, 6);
      expect(relErr(p.halfWidth, tQuantile(0.975, 34) * sigmaP)).toBeLessThan(1e-12);
    });
  }

  it('is wider away from the mean of x, and the exit date is where the band meets the tolerance', () => {
    expect(predict(fit, 1200).halfWidth).toBeGreaterThan(predict(fit, xbar).halfWidth);
    // Residuals about the line y = x: the band of y - x reaches +-5 somewhere; check the crossing.
    const line = fitLine(pts.map((p) => ({ x: p.x, y: p.y - p.x })));
    const exit = projectedExit(line, 0, 5, { horizon: 5000 });
    expect(exit).not.toBeNull();
    const at = predict(line, exit as number);
    expect(Math.max(at.value + at.halfWidth, -(at.value - at.halfWidth))).toBeCloseTo(5, 6);
  });
});

describe('attributes method: NCSL International RP-1 table D-1 data, exponential reliability model', () => {
  // Data: test/data/ncsli-rp1/table-d1.txt (a transcription from a secondary source, as the
  // file says). Observed in-tolerance counts are n x R rounded to whole calibrations.
  const rows = readFileSync(path.join(DATA, 'ncsli-rp1/table-d1.txt'), 'utf8')
    .split('\n')
    .filter((l) => l.trim() && !l.startsWith('#'))
    .map((l) => l.trim().split(/\s+/).map(Number) as [number, number, number]);
  const records: AttributeRecord[] = [];
  for (const [weeks, n, r] of rows) {
    const x = Math.round(n * r);
    for (let i = 0; i < n; i++) records.push({ interval: weeks, inTolerance: i < x });
  }
  let fit: ReturnType<typeof fitExponentialReliability>;
  beforeEach(() => {
    fit = fitExponentialReliability(records);
  });

  it('reads 132 calibrations, 69 found in tolerance', () => {
    expect(rows).toHaveLength(8);
    expect(fit.n).toBe(132);
    expect(fit.inTolerance).toBe(69);
  });

  it('finds lambda = 0.0281159 per week (computed from the published data)', () => {
    // Computed from the published data by this product: lambda = 0.028116 / week,
    // u(lambda) = 0.0036 / week (observed information); R* = 0.95 gives 1.82 weeks,
    // R* = 0.72 gives 11.7 weeks, R* = 0.5 gives 24.7 weeks.
    expect(fit.lambda).toBeCloseTo(0.0281159, 6);
    expect(fit.uLambda as number).toBeCloseTo(0.003638, 5);
    expect(exponentialInterval(fit.lambda, 0.95)).toBeCloseTo(1.8244, 3);
    expect(exponentialInterval(fit.lambda, 0.72)).toBeCloseTo(11.684, 2);
    expect(exponentialInterval(fit.lambda, 0.5)).toBeCloseTo(24.653, 2);
  });

  it('is the maximum of the likelihood (checked by a golden-section search, not the score)', () => {
    let a = 1e-4;
    let b = 1;
    const g = (Math.sqrt(5) - 1) / 2;
    for (let i = 0; i < 200; i++) {
      const c = b - g * (b - a);
      const d = a + g * (b - a);
      if (exponentialLogLikelihood(records, c) > exponentialLogLikelihood(records, d)) b = d;
      else a = c;
    }
    expect(relErr(fit.lambda, (a + b) / 2)).toBeLessThan(1e-6);
  });

  it('tests observed reliability against the target with the binomial distribution', () => {
    // 20 of 49 in tolerance at 28 weeks against a target of 0.95: clearly different.
    const t = binomialTest(20, 49, 0.95);
    expect(t.significant).toBe(true);
    expect(t.pValue).toBeLessThan(1e-10);
    // 19 of 20 against 0.95 is exactly what the target predicts: no reason to change.
    expect(binomialTest(19, 20, 0.95).significant).toBe(false);
  });
});

describe('method names: ILAC-G24:2022 / OIML D 10:2022 section 6', () => {
  it('names the staircase as method 1, "automatic adjustment or staircase"', () => {
    // 6.2 "Method 1: Automatic adjustment or 'staircase' (calendar-time)".
    expect(METHOD_NAMES.staircase).toMatch(/ILAC-G24 \/ OIML D 10 method 1/);
    expect(METHOD_NAMES.staircase).toMatch(/staircase/);
    expect(METHOD_NAMES.staircase).toMatch(/automatic adjustment/);
    expect(METHOD_NAMES.attributes).toMatch(/RP-1/);
    expect(METHOD_NAMES.variables).toMatch(/JCGM 106/);
  });
});
