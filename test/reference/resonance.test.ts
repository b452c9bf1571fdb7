// Resonance fitting against outside sources: NPL Report MAT 58 (A. P. Gregory, 2021) Figure 27
// data and its published fit; synthetic 1 dB and 2.5 dB dips of QL 1500 (common practice for an
// absorption meter) with seeded noise; the Sparrow limit of two Lorentzian dips; and the refusals.
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { fitResonances, ResonanceError } from '../../app/engine/resonance';
import { syntheticSweep } from '../fixtures/sweeps';

const figure27 = readFileSync(new URL('../data/npl-mat58/Figure27.txt', import.meta.url), 'utf8')
  .trim()
  .split('\n')
  .map((l) => l.trim().split(/\s+/).map(Number) as [number, number, number]);
const f27 = figure27.map((r) => r[0] * 1e9);
const re27 = figure27.map((r) => r[1]);
const im27 = figure27.map((r) => r[2]);

// NPL Report MAT 58 (2021), Figure 27 (absorption resonator, uncalibrated S21): published weighted
// complex fit f_L = 6.07225567 GHz, Q_L = 56,020, Q-circle diameter 0.970 (data: CC0, NPL).
const PUBLISHED_FL_HZ = 6.07225567e9;
const PUBLISHED_QL = 56020;

describe('NPL MAT 58 Figure 27 (absorption resonator, uncalibrated S21)', () => {
  const complex = fitResonances({ kind: 'complex', frequencyHz: f27, re: re27, im: im27 }).main;

  it('complex fit with leakage and circle rotation reproduces the published f_L and Q_L', () => {
    expect(complex.method).toBe('complex-circle');
    // f_L is published to 10 Hz; Q_L to 5 significant figures.
    expect(Math.abs(complex.f0Hz - PUBLISHED_FL_HZ)).toBeLessThan(10);
    expect(Math.abs(complex.loadedQ - PUBLISHED_QL)).toBeLessThan(5);
    // MAT 58 Figure 27: Q-circle diameter 0.970.
    expect(complex.qCircleDiameter).toBeCloseTo(0.97, 2);
    // The published f_L lies well within the fit's own standard uncertainty.
    expect(complex.f0UncertaintyHz).toBeGreaterThan(10);
    expect(complex.f0UncertaintyHz).toBeLessThan(0.02 * complex.halfDepthBandwidthHz);
    // Notch coupling: 1/QL = 1/Q0 + 1/Qe.
    expect(1 / (complex.unloadedQ as number) + 1 / (complex.externalQ as number)).toBeCloseTo(
      1 / complex.loadedQ,
      12,
    );
  });

  it('the scalar fit on |S21|^2 of the same data is biased, as the rotated circle makes the dip asymmetric', () => {
    const power = re27.map((r, i) => r * r + (im27[i] as number) ** 2);
    const scalar = fitResonances({ kind: 'scalar', frequencyHz: f27, power }).main;
    const scalarBiasHz = scalar.f0Hz - PUBLISHED_FL_HZ;
    const complexBiasHz = complex.f0Hz - PUBLISHED_FL_HZ;
    // Reported, not hidden: the scalar model is several kHz off (a tenth of a linewidth) and its QL
    // far from 56,020, against a few Hz for the complex fit.
    expect(Math.abs(scalarBiasHz)).toBeGreaterThan(100 * Math.abs(complexBiasHz));
    expect(Math.abs(scalarBiasHz)).toBeGreaterThan(1000);
    expect(Math.abs(scalar.loadedQ / PUBLISHED_QL - 1)).toBeGreaterThan(0.2);
  });
});

describe('synthetic dips, QL = 1500 (common practice), seeded noise of 1 % + 0.2 %', () => {
  const f0Hz = 9.375e9;
  const loadedQ = 1500;
  const linewidthHz = f0Hz / loadedQ;
  for (const depthDb of [1, 2.5]) {
    for (const points of [401, 10001]) {
      it(`${depthDb} dB dip, ${points} points: f0 within 2 % of the linewidth, QL within 5 %`, () => {
        for (let seed = 1; seed <= 6; seed++) {
          const offset = (seed - 3.5) * 0.11 * linewidthHz; // the dip off the sweep's centre
          const s = syntheticSweep([{ f0Hz: f0Hz + offset, loadedQ, depthDb }], {
            startHz: f0Hz - 5 * linewidthHz,
            stopHz: f0Hz + 5 * linewidthHz,
            points,
            seed,
          });
          const r = fitResonances({ kind: 'scalar', ...s });
          expect(Math.abs(r.main.f0Hz - (f0Hz + offset))).toBeLessThan(0.02 * linewidthHz);
          expect(Math.abs(r.main.loadedQ / loadedQ - 1)).toBeLessThan(0.05);
          expect(r.main.depthDb).toBeCloseTo(depthDb, 0);
          expect(r.spurious).toEqual([]);
        }
      });
    }
  }

  it('u(f0) from the covariance matches the scatter of f0 over repeated sweeps (within 40 %)', () => {
    const estimates: number[] = [];
    const reported: number[] = [];
    for (let seed = 1; seed <= 40; seed++) {
      const s = syntheticSweep([{ f0Hz, loadedQ, depthDb: 1 }], {
        startHz: f0Hz - 5 * linewidthHz,
        stopHz: f0Hz + 5 * linewidthHz,
        points: 501,
        seed: 1000 + seed,
        noise: 3,
      });
      const r = fitResonances({ kind: 'scalar', ...s });
      estimates.push(r.main.f0Hz);
      reported.push(r.main.f0UncertaintyHz);
    }
    const mean = estimates.reduce((a, b) => a + b, 0) / estimates.length;
    const sd = Math.sqrt(estimates.reduce((a, b) => a + (b - mean) ** 2, 0) / (estimates.length - 1));
    const u = reported.reduce((a, b) => a + b, 0) / reported.length;
    expect(u / sd).toBeGreaterThan(0.6);
    expect(u / sd).toBeLessThan(1.4);
  });

  it('reports a second dip as a spurious response, the deeper one as the resonance', () => {
    const s = syntheticSweep(
      [
        { f0Hz, loadedQ, depthDb: 2.5 },
        { f0Hz: f0Hz + 8 * linewidthHz, loadedQ: 3000, depthDb: 0.6 },
      ],
      { startHz: f0Hz - 6 * linewidthHz, stopHz: f0Hz + 14 * linewidthHz, points: 4001, seed: 9 },
    );
    const r = fitResonances({ kind: 'scalar', ...s });
    expect(Math.abs(r.main.f0Hz - f0Hz)).toBeLessThan(0.02 * linewidthHz);
    expect(r.spurious).toHaveLength(1);
    const spur = r.spurious[0];
    expect(Math.abs((spur?.f0Hz ?? 0) - (f0Hz + 8 * linewidthHz))).toBeLessThan(0.05 * linewidthHz);
    expect(spur?.depthDb).toBeCloseTo(0.6, 0);
    expect(r.notes.join(' ')).toMatch(/spurious/);
  });
});

describe('resolution', () => {
  it('two equal Lorentzian dips are two (a maximum between them) just above FWHM / sqrt(3), one just below', () => {
    // Sum of two Lorentzians of unit half width at +/- s: the midpoint is a maximum of the
    // absorption (a dip is seen as one) when s < 1/sqrt(3), a minimum (two dips) when s > 1/sqrt(3).
    const l = (x: number) => 1 / (1 + x * x);
    const sum = (x: number, s: number) => l(x - s) + l(x + s);
    const curvatureAtMidpoint = (s: number) => sum(1e-3, s) + sum(-1e-3, s) - 2 * sum(0, s);
    const limit = 1 / Math.sqrt(3);
    expect(curvatureAtMidpoint(limit * 0.98)).toBeLessThan(0);
    expect(curvatureAtMidpoint(limit * 1.02)).toBeGreaterThan(0);
    // The fit reports the spacing 2 s = FWHM / sqrt(3) (FWHM = 2 in these units).
    const s = syntheticSweep([{ f0Hz: 1e10, loadedQ: 1500, depthDb: 2 }], {
      startHz: 1e10 * (1 - 4 / 1500),
      stopHz: 1e10 * (1 + 4 / 1500),
      points: 801,
      seed: 3,
    });
    const fit = fitResonances({ kind: 'scalar', ...s }).main;
    expect(fit.twoToneResolutionHz).toBeCloseTo(fit.halfDepthBandwidthHz / Math.sqrt(3), 6);
    expect(fit.halfDepthBandwidthHz).toBeCloseTo(fit.f0Hz / fit.loadedQ, 3);
  });
});

describe('refusals, each with a plain message', () => {
  const f0Hz = 9.375e9;
  const w = f0Hz / 1500;
  const code = (fn: () => unknown): string => {
    try {
      fn();
    } catch (e) {
      if (e instanceof ResonanceError) return `${e.code}: ${e.message}`;
      throw e;
    }
    return 'no error';
  };

  it('a trace with no dip', () => {
    const s = syntheticSweep([], { startHz: f0Hz - 5 * w, stopHz: f0Hz + 5 * w, points: 801, seed: 4 });
    expect(code(() => fitResonances({ kind: 'scalar', ...s }))).toMatch(/^no-dip: no dip found/);
  });

  it('a dip at the edge of the sweep', () => {
    const s = syntheticSweep([{ f0Hz, loadedQ: 1500, depthDb: 2 }], {
      startHz: f0Hz - 0.2 * w,
      stopHz: f0Hz + 6 * w,
      points: 801,
      seed: 5,
    });
    expect(code(() => fitResonances({ kind: 'scalar', ...s }))).toMatch(/^edge: .*edge of the sweep/);
  });

  it('too few points per linewidth', () => {
    const s = syntheticSweep([{ f0Hz, loadedQ: 1500, depthDb: 2.5 }], {
      startHz: f0Hz - 12 * w,
      stopHz: f0Hz + 12 * w,
      points: 41,
      seed: 6,
      noise: 0.1,
    });
    expect(code(() => fitResonances({ kind: 'scalar', ...s }))).toMatch(
      /^undersampled: too few points per linewidth/,
    );
  });

  it('frequencies that do not rise steadily', () => {
    const s = syntheticSweep([{ f0Hz, loadedQ: 1500, depthDb: 2 }], {
      startHz: f0Hz - 5 * w,
      stopHz: f0Hz + 5 * w,
      points: 101,
      seed: 7,
    });
    s.frequencyHz[50] = s.frequencyHz[48] as number;
    expect(code(() => fitResonances({ kind: 'scalar', ...s }))).toMatch(/^non-monotonic: point 51/);
  });

  it('too short a trace', () => {
    expect(code(() => fitResonances({ kind: 'scalar', frequencyHz: [1e9, 2e9], power: [1, 1] }))).toMatch(
      /^too-few-points/,
    );
  });
});
