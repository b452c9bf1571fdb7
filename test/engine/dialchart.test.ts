// Dial charts of divisions meters: which model wins on points that follow each law, the fallback
// when neither does, the inverse, and the printable table.
import { describe, expect, it } from 'vitest';
import {
  chartTable,
  DialChartError,
  fitDialChart,
  modelDivisions,
  modelFrequencyHz,
} from '../../app/engine/dial-chart';
import { SPEED_OF_LIGHT_M_PER_S } from '../../app/engine/waveguide';

/** Capacitively loaded coaxial cavity: the fundamental root of Z0 tan(2 pi f l / c) = 1 / (2 pi f C). */
function coaxialHz(lengthM: number, tauS: number): number {
  let lo = 1;
  let hi = SPEED_OF_LIGHT_M_PER_S / (4 * lengthM);
  for (let i = 0; i < 200; i++) {
    const f = (lo + hi) / 2;
    const lhs = Math.tan((2 * Math.PI * f * lengthM) / SPEED_OF_LIGHT_M_PER_S);
    if (lhs < 1 / (2 * Math.PI * f * tauS)) lo = f;
    else hi = f;
  }
  return (lo + hi) / 2;
}

describe('fitDialChart', () => {
  it('picks the loaded coaxial model for points that follow it, with residuals near zero', () => {
    const points = [0, 3, 6, 9, 12, 15, 18, 21].map((d) => ({
      divisions: d,
      frequencyHz: coaxialHz(0.012 + 0.0007 * d, 50 * 1.5e-12),
    }));
    const fit = fitDialChart(points, 500);
    expect(fit.model.kind).toBe('coaxial-loaded');
    expect(fit.maxResidualPpm).toBeLessThan(0.1);
    const te = fit.candidates.find((c) => c.model === 'cylindrical-te011');
    expect(te?.accepted).toBe(false);
    // Inversion: frequency -> divisions -> frequency.
    const f = coaxialHz(0.012 + 0.0007 * 7.3, 50 * 1.5e-12);
    expect(modelDivisions(fit, f)).toBeCloseTo(7.3, 5);
  });

  it('falls back to the monotone interpolant, with leave-one-out residuals, when neither model fits', () => {
    // A chart with a kink no cavity law makes.
    const points = [
      { divisions: 0, frequencyHz: 4.0e9 },
      { divisions: 5, frequencyHz: 3.5e9 },
      { divisions: 10, frequencyHz: 3.3e9 },
      { divisions: 15, frequencyHz: 2.6e9 },
      { divisions: 20, frequencyHz: 2.5e9 },
    ];
    const fit = fitDialChart(points, 500);
    expect(fit.model.kind).toBe('monotone-interpolant');
    expect(fit.notes.join(' ')).toMatch(/no physical model fits/);
    expect(fit.maxResidualPpm).toBeGreaterThan(500);
    expect(fit.residuals[0]?.residualHz).toBe(0);
    expect(modelDivisions(fit, 3.3e9)).toBeCloseTo(10, 9);
  });

  it('with fewer than 4 points says the physical models need more and uses the interpolant', () => {
    const fit = fitDialChart(
      [
        { divisions: 0, frequencyHz: 9e9 },
        { divisions: 10, frequencyHz: 10e9 },
        { divisions: 20, frequencyHz: 11e9 },
      ],
      250,
    );
    expect(fit.model.kind).toBe('monotone-interpolant');
    expect(fit.candidates[0]?.reason).toMatch(/at least 4 points/);
  });

  it('refuses a chart that is not monotone, or a single point', () => {
    expect(() => fitDialChart([{ divisions: 0, frequencyHz: 9e9 }], 250)).toThrow(DialChartError);
    expect(() =>
      fitDialChart(
        [
          { divisions: 0, frequencyHz: 9e9 },
          { divisions: 1, frequencyHz: 10e9 },
          { divisions: 2, frequencyHz: 9.5e9 },
        ],
        250,
      ),
    ).toThrow(/monotone/);
  });

  it('prints a table on round steps that ends inside the chart', () => {
    const points = [0, 4, 8, 12, 16, 20].map((d) => ({ divisions: d, frequencyHz: 8e9 + 0.2e9 * d }));
    const fit = fitDialChart(points, 250);
    const rows = chartTable(fit, 2.5);
    expect(rows.map((r) => r.divisions)).toEqual([0, 2.5, 5, 7.5, 10, 12.5, 15, 17.5, 20]);
    for (const r of rows)
      expect(r.frequencyHz).toBeCloseTo(
        fit.model.kind === 'monotone-interpolant'
          ? 8e9 + 0.2e9 * r.divisions
          : modelFrequencyHz(fit.model, r.divisions),
        -3,
      );
    expect(() => chartTable(fit, 0)).toThrow(DialChartError);
  });
});
