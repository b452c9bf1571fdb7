// Resonance fit of 10,001-point traces (1 dB and 2.5 dB dips, QL 1500, seeded noise): our weighted
// Levenberg-Marquardt (app/engine/lsq.ts via fitScalarDip) against ml-levenberg-marquardt, the
// general-purpose fitter, on the same points, model, scaled parameters and start values. Figures:
// speed ratio, f0 error of each against 2 % of the linewidth, and their f0 errors against each other.
import { levenbergMarquardt as mlFit } from 'ml-levenberg-marquardt';
import { fitResonances, fitScalarDip } from '../../app/engine/resonance';
import { syntheticSweep } from '../fixtures/sweeps';
import type { BenchFigure } from './run';

const F0 = 9.375e9;
const QL = 1500;
const W = F0 / QL;
const SEEDS = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10];

function median(v: number[]): number {
  const s = [...v].sort((a, b) => a - b);
  return s[s.length >> 1] as number;
}

function time<T>(fn: () => T): { ms: number; value: T } {
  const t = performance.now();
  const value = fn();
  return { ms: performance.now() - t, value };
}

export function figures(): BenchFigure[] {
  const out: BenchFigure[] = [];
  for (const depthDb of [1, 2.5]) {
    const oursMs: number[] = [];
    const mlMs: number[] = [];
    const pipelineMs: number[] = [];
    const oursErr: number[] = [];
    const mlErr: number[] = [];
    for (const seed of SEEDS) {
      const truth = F0 + (seed - 3) * 0.07 * W;
      const s = syntheticSweep([{ f0Hz: truth, loadedQ: QL, depthDb }], {
        startHz: F0 - 5 * W,
        stopHz: F0 + 5 * W,
        points: 10001,
        seed,
      });
      // Start values both fitters share: the sweep's centre, the nominal width, a guessed depth.
      const start = { f0Hz: F0, widthHz: W, depth: 0.3, baseline: s.power[0] as number, slopePerHz: 0 };
      const ours = time(() => fitScalarDip(s.frequencyHz, s.power, start));
      oursMs.push(ours.ms);
      oursErr.push(Math.abs(ours.value.f0Hz - truth));
      pipelineMs.push(time(() => fitResonances({ kind: 'scalar', ...s })).ms);
      const x = s.frequencyHz.map((f) => (f - start.f0Hz) / start.widthHz);
      const y = s.power.map((p) => p / start.baseline);
      const ml = time(() =>
        mlFit(
          { x, y },
          ([x0, g, a, c0, c1]) =>
            (xi: number) => {
              const dx = xi - (x0 as number);
              const u = (g as number) * dx;
              return ((c0 as number) + (c1 as number) * dx) * (1 - (a as number) / (1 + u * u));
            },
          {
            initialValues: [0, 2, start.depth, 1, 0],
            minValues: [-5, 0.01, 0, 0.1, -10],
            maxValues: [5, 100, 0.999, 10, 10],
            gradientDifference: 1e-6,
            maxIterations: 200,
            errorTolerance: 1e-12,
          },
        ),
      );
      mlMs.push(ml.ms);
      mlErr.push(Math.abs(start.f0Hz + start.widthHz * (ml.value.parameterValues[0] as number) - truth));
    }
    const label = `${depthDb} dB, 10,001 pts`;
    out.push(
      {
        name: `${label}: speed, ml-levenberg-marquardt time / ours`,
        value: median(mlMs) / median(oursMs),
        // Issue 8's target: at least 5 times faster than the general-purpose fitter.
        floor: 5,
      },
      {
        name: `${label}: our fits per second (weighted, two passes)`,
        value: 1000 / median(oursMs),
        floor: 10,
      },
      {
        name: `${label}: whole fitResonances per second (find + fit)`,
        value: 1000 / median(pipelineMs),
        floor: 5,
      },
      {
        name: `${label}: ours, 2 % of linewidth / worst f0 error`,
        value: (0.02 * W) / Math.max(...oursErr),
        floor: 1,
      },
      {
        name: `${label}: ml, 2 % of linewidth / worst f0 error`,
        value: (0.02 * W) / Math.max(...mlErr),
        floor: 1,
      },
      {
        name: `${label}: mean f0 error, ml / ours`,
        value: mlErr.reduce((a, b) => a + b, 0) / oursErr.reduce((a, b) => a + b, 0),
        // Issue 8: at equal or smaller f0 error than the general-purpose fitter.
        floor: 1,
      },
    );
  }
  return out;
}
