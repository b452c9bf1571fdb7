// The picture of a fitted dip: the fitted curve is the scalar Lorentzian model itself (its depth at
// f0 and half its depth at f0 +- f0/(2 QL), the definition of loaded Q as f0 over the full width at
// half depth; K. J. Petersan and S. M. Anlage, J. Appl. Phys. 84, 3392 (1998)), it lies on a
// noiseless trace, and thinning keeps the bottom of the dip.
import { describe, expect, it } from 'vitest';
import { dipPlot, fittedRelativePower } from '../../app/engine/dipplot';
import { fitResonances } from '../../app/engine/resonance';
import { syntheticSweep } from '../fixtures/sweeps';

const F0 = 9.375e9;
const QL = 1500;
const W = F0 / QL;

function fitted(points: number, noise: number) {
  const s = syntheticSweep([{ f0Hz: F0, loadedQ: QL, depthDb: 2.5 }], {
    startHz: F0 - 5 * W,
    stopHz: F0 + 5 * W,
    points,
    seed: 3,
    noise,
  });
  const trace = { kind: 'scalar' as const, frequencyHz: s.frequencyHz, power: s.power };
  return { trace, fit: fitResonances(trace).main };
}

describe('dipPlot', () => {
  it('draws the fitted depth at f0 and half the depth a half linewidth either side', () => {
    const { fit } = fitted(401, 0);
    const half = fit.f0Hz / (2 * fit.loadedQ);
    // At f0 the model absorbs A of the baseline: 10 log10(1 - A) = -depth in dB.
    expect(10 * Math.log10(fittedRelativePower(fit, fit.f0Hz))).toBeCloseTo(-fit.depthDb, 9);
    for (const f of [fit.f0Hz - half, fit.f0Hz + half]) {
      const slope = 1 + (fit.baselineSlopePerHz * (f - fit.f0Hz)) / fit.baselineAtF0;
      expect(fittedRelativePower(fit, f) / slope).toBeCloseTo(1 - fit.depthFraction / 2, 12);
    }
    expect(fit.depthDb).toBeCloseTo(2.5, 3);
  });

  it('puts the fitted curve on a noiseless trace', () => {
    const { trace, fit } = fitted(401, 0);
    const plot = dipPlot(trace, fit);
    expect(plot.frequencyHz).toHaveLength(401);
    const worst = Math.max(...plot.measuredDb.map((m, i) => Math.abs(m - (plot.fittedDb[i] as number))));
    expect(worst).toBeLessThan(1e-3);
    expect(Math.min(...plot.measuredDb)).toBeCloseTo(-2.5, 2);
  });

  it('thins a 10,001-point trace to about the size asked for, keeping the bottom of the dip', () => {
    const { trace, fit } = fitted(10001, 1);
    const plot = dipPlot(trace, fit, 600);
    expect(plot.frequencyHz.length).toBeLessThanOrEqual(600 + 300 + 1);
    expect(plot.frequencyHz.length).toBeGreaterThan(300);
    // Ascending, first and last kept, and dense around f0.
    expect(plot.frequencyHz.every((f, i) => i === 0 || f > (plot.frequencyHz[i - 1] as number))).toBe(true);
    expect(plot.frequencyHz[0]).toBe(trace.frequencyHz[0]);
    expect(plot.frequencyHz.at(-1)).toBe(trace.frequencyHz.at(-1));
    const nearF0 = plot.frequencyHz.filter((f) => Math.abs(f - fit.f0Hz) < fit.halfDepthBandwidthHz).length;
    expect(nearF0).toBeGreaterThan(100);
  });
});
