// Resonance fit of 10,001-point traces (1 dB and 2.5 dB dips, QL 1500, seeded noise): our weighted
// Levenberg-Marquardt (app/engine/lsq.ts via fitScalarDip) against ml-levenberg-marquardt, the
// general-purpose fitter, on the same points, model, scaled parameters and start values. Figures:
// speed ratio, f0 error of each against 2 % of the linewidth, and their f0 errors against each other.
//
// Why the f0 comparison runs on many sweeps and not on ml's ten: ml minimises the unweighted sum of
// squares, ours the sum weighted by the noise model (1 / (s_a^2 + s_m^2 P^2), the model the fixture's
// noise follows), and on this fixture the weighted fit gains little: the asymptotic covariances
// (sandwich (J'J)^-1 J'VJ (J'J)^-1 against (J'V^-1 J)^-1) give an f0 standard deviation 0.46 % smaller
// at 1 dB and 2.9 % smaller at 2.5 dB. The sweep-to-sweep scatter of the paired difference of
// |f0 error| is about 12 % (1 dB) and 30 % (2.5 dB) of the mean error, so ten sweeps cannot tell which
// fitter is closer: they gave ml / ours = 0.96 and 0.95, differences of 0.6 and 0.3 standard errors.
// ml is far too slow for thousands of sweeps in a benchmark of under a minute,
// so the many-sweep comparison is against the unweighted least-squares minimum computed by our
// solver, and a separate figure checks, on every sweep ml does fit, that ml lands on that same
// minimum (its f0 within 1 % of the fit's standard uncertainty). 2,000 sweeps at 1 dB (standard
// error of the ratio about 0.3 %) and 500 at 2.5 dB (about 1.4 %).
//
// The speed ratio is against ml stopped where it has converged, not after maxIterations 200: ml's
// only stopping test is a sum of squares at or below errorTolerance (an absolute level, which a noisy
// trace never reaches), so it would always run all 200 iterations, although its f0 settles after 2 to
// 8. The fair floor: for each trace, found beforehand, the smallest maxIterations at which ml's f0 and
// QL agree with its own 200-iteration result to within 1 % of their standard uncertainties (those of
// our fit; ml reports none). No user could know that number in advance, so a fixed maxIterations a
// user would set can only be slower: the floor flatters ml, not us. ml is timed both ways a user
// could give it the model: with its finite-difference Jacobian and with its jacobianFunction option
// (the analytic derivatives ours uses), and the faster median of the two is the floor. Each fit,
// ours and ml's, is timed as the mean of back-to-back runs on its trace over at least 100 ms (see
// timePerRun), then the median over the 10 traces.
import { levenbergMarquardt as mlFit } from 'ml-levenberg-marquardt';
import { levenbergMarquardt, type LsqProblem } from '../../app/engine/lsq';
import { fitResonances, fitScalarDip } from '../../app/engine/resonance';
import { complexSweep, syntheticSweep, type SyntheticSweep } from '../fixtures/sweeps';
import type { BenchFigure } from './run';

const F0 = 9.375e9;
const QL = 1500;
const W = F0 / QL;
/** Sweeps on which ml runs (timed, and its f0 checked against the unweighted minimum). */
const ML_SEEDS = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10];
/** Sweeps for the f0 comparison, per depth (see the note above for the counts). */
const ACCURACY_SWEEPS: Record<number, number> = { 1: 2000, 2.5: 500 };

function median(v: number[]): number {
  const s = [...v].sort((a, b) => a - b);
  return s[s.length >> 1] as number;
}

function mean(v: number[]): number {
  return v.reduce((a, b) => a + b, 0) / v.length;
}

function time<T>(fn: () => T): { ms: number; value: T } {
  const t = performance.now();
  const value = fn();
  return { ms: performance.now() - t, value };
}

/**
 * Mean time of back-to-back runs over at least 100 ms (and 3 runs), after one unmeasured run.
 * On a machine shared with other jobs the scheduler gives each process a fair share over such a
 * span, so the ratio of two such means is not biased for the shorter task as a minimum of runs
 * would be (a short run escapes interruption more often), nor against it as a median of a few
 * runs would be (one interruption is a larger fraction of a short run).
 */
function timePerRun<T>(fn: () => T): { ms: number; value: T } {
  const value = fn();
  let runs = 0;
  const t = performance.now();
  let elapsed = 0;
  while (runs < 3 || elapsed < 100) {
    fn();
    runs++;
    elapsed = performance.now() - t;
  }
  return { ms: elapsed / runs, value };
}

function sweepOf(depthDb: number, seed: number): { truth: number; s: SyntheticSweep } {
  const truth = F0 + (((seed - 1) % 10) - 2) * 0.07 * W;
  const s = syntheticSweep([{ f0Hz: truth, loadedQ: QL, depthDb }], {
    startHz: F0 - 5 * W,
    stopHz: F0 + 5 * W,
    points: 10001,
    seed,
  });
  return { truth, s };
}

/** Start values both fitters share: the sweep's centre, the nominal width, a guessed depth. */
function startOf(s: SyntheticSweep) {
  return { f0Hz: F0, widthHz: W, depth: 0.3, baseline: s.power[0] as number, slopePerHz: 0 };
}

/** The model in the scaled variables ml is given: x = (f - F0) / W, y = P / baseline. */
function dipModel([x0, g, a, c0, c1]: number[]) {
  return (xi: number): number => {
    const dx = xi - (x0 as number);
    const u = (g as number) * dx;
    return ((c0 as number) + (c1 as number) * dx) * (1 - (a as number) / (1 + u * u));
  };
}

/** Analytic derivatives of dipModel, for ml's jacobianFunction option. */
function dipJacobian([x0, g, a, c0, c1]: number[]) {
  return (xi: number): number[] => {
    const dx = xi - (x0 as number);
    const u = (g as number) * dx;
    const l = 1 / (1 + u * u);
    const d = 1 - (a as number) * l;
    const b = (c0 as number) + (c1 as number) * dx;
    const bal2u = 2 * b * (a as number) * l * l * u;
    return [-(c1 as number) * d - bal2u * (g as number), bal2u * dx, -b * l, d, dx * d];
  };
}

/** ml on the scaled trace, stopped after `maxIterations`; the bench's one configuration of it apart
 * from the Jacobian. */
function runMl(x: number[], y: number[], depth: number, maxIterations: number, analytic: boolean) {
  return mlFit({ x, y }, dipModel, {
    initialValues: [0, 2, depth, 1, 0],
    minValues: [-5, 0.01, 0, 0.1, -10],
    maxValues: [5, 100, 0.999, 10, 10],
    gradientDifference: 1e-6,
    maxIterations,
    errorTolerance: 1e-12,
    ...(analytic ? { jacobianFunction: dipJacobian } : {}),
  });
}

/**
 * ml's fair stopping point on one trace and its time there: the smallest maxIterations whose f0 and
 * QL lie within 1 % of u(f0) and u(QL) of ml's 200-iteration result.
 */
function mlConverged(
  x: number[],
  y: number[],
  depth: number,
  analytic: boolean,
  u: { f0Hz: number; loadedQ: number },
): { ms: number; iterations: number; full: number[] } {
  const f0AndQ = (p: number[]) => {
    const f0Hz = F0 + W * (p[0] as number);
    return { f0Hz, loadedQ: ((p[1] as number) * f0Hz) / (2 * W) };
  };
  const full = runMl(x, y, depth, 200, analytic).parameterValues;
  const target = f0AndQ(full);
  let iterations = 200;
  for (let k = 1; k < 200; k++) {
    const at = f0AndQ(runMl(x, y, depth, k, analytic).parameterValues);
    if (
      Math.abs(at.f0Hz - target.f0Hz) <= 0.01 * u.f0Hz &&
      Math.abs(at.loadedQ - target.loadedQ) <= 0.01 * u.loadedQ
    ) {
      iterations = k;
      break;
    }
  }
  return { ms: timePerRun(() => runMl(x, y, depth, iterations, analytic)).ms, iterations, full };
}

/** f0 of the unweighted least-squares minimum (ml's objective), solved by our LM to convergence. */
function unweightedMinimumF0Hz(x: number[], y: number[]): number {
  const n = x.length;
  const problem: LsqProblem = {
    rows: n,
    params: 5,
    evaluate(p, r, jac) {
      const [x0, g, a, c0, c1] = p as unknown as [number, number, number, number, number];
      if (!(g > 0) || !(a > 0) || !(a < 1) || !(c0 > 0)) return false;
      for (let i = 0; i < n; i++) {
        const dx = (x[i] as number) - x0;
        const u = g * dx;
        const l = 1 / (1 + u * u);
        const d = 1 - a * l;
        const b = c0 + c1 * dx;
        r[i] = (y[i] as number) - b * d;
        if (jac) {
          const k = i * 5;
          const dLdu = -2 * u * l * l;
          jac[k] = -c1 * d + b * a * dLdu * g;
          jac[k + 1] = -b * a * dLdu * dx;
          jac[k + 2] = -b * l;
          jac[k + 3] = d;
          jac[k + 4] = dx * d;
        }
      }
      return true;
    },
  };
  return F0 + W * (levenbergMarquardt(problem, [0, 2, 0.3, 1, 0]).params[0] as number);
}

function scaled(s: SyntheticSweep): { x: number[]; y: number[] } {
  const start = startOf(s);
  return {
    x: s.frequencyHz.map((f) => (f - start.f0Hz) / start.widthHz),
    y: s.power.map((p) => p / start.baseline),
  };
}

export function figures(): BenchFigure[] {
  const out: BenchFigure[] = [];
  // Both fitters are timed warm. ml runs hundreds of times on each trace (finding its stopping
  // point) before it is timed; ours ran only once before its timing, so the depth timed first
  // measured it partly before the JIT had settled (about 30 % slower, and 2x before the fit's
  // loops were made stable). So ours first runs 20 times on every trace of both depths.
  const warmUp = [1, 2.5].flatMap((depthDb) => ML_SEEDS.map((seed) => sweepOf(depthDb, seed).s));
  for (let round = 0; round < 20; round++)
    for (const s of warmUp) fitScalarDip(s.frequencyHz, s.power, startOf(s));
  for (const depthDb of [1, 2.5]) {
    const oursMs: number[] = [];
    const mlMs: Record<'fd' | 'analytic', number[]> = { fd: [], analytic: [] };
    const pipelineMs: number[] = [];
    const oursErr: number[] = [];
    const mlErr: number[] = [];
    const mlOffMinimum: number[] = [];
    const oursU: number[] = [];
    for (const seed of ML_SEEDS) {
      const { truth, s } = sweepOf(depthDb, seed);
      const start = startOf(s);
      const ours = timePerRun(() => fitScalarDip(s.frequencyHz, s.power, start));
      oursMs.push(ours.ms);
      oursErr.push(Math.abs(ours.value.f0Hz - truth));
      oursU.push(ours.value.f0UncertaintyHz);
      pipelineMs.push(time(() => fitResonances({ kind: 'scalar', ...s })).ms);
      const { x, y } = scaled(s);
      const u = { f0Hz: ours.value.f0UncertaintyHz, loadedQ: ours.value.loadedQUncertainty };
      const fd = mlConverged(x, y, start.depth, false, u);
      const analytic = mlConverged(x, y, start.depth, true, u);
      mlMs.fd.push(fd.ms);
      mlMs.analytic.push(analytic.ms);
      // The accuracy figures use ml as configured before (finite differences), run to 200 iterations.
      const mlF0Hz = start.f0Hz + start.widthHz * (fd.full[0] as number);
      mlErr.push(Math.abs(mlF0Hz - truth));
      mlOffMinimum.push(Math.abs(mlF0Hz - unweightedMinimumF0Hz(x, y)));
    }
    // The f0 comparison: the same sweeps for both, paired.
    const sweeps = ACCURACY_SWEEPS[depthDb] as number;
    const weightedErr: number[] = [];
    const unweightedErr: number[] = [];
    for (let seed = 1; seed <= sweeps; seed++) {
      const { truth, s } = sweepOf(depthDb, seed);
      weightedErr.push(Math.abs(fitScalarDip(s.frequencyHz, s.power, startOf(s)).f0Hz - truth));
      const { x, y } = scaled(s);
      unweightedErr.push(Math.abs(unweightedMinimumF0Hz(x, y) - truth));
    }
    const label = `${depthDb} dB, 10,001 pts`;
    out.push(
      {
        name: `${label}: speed, ml-levenberg-marquardt stopped at convergence / ours`,
        value: Math.min(median(mlMs.fd), median(mlMs.analytic)) / median(oursMs),
        // At least 5 times faster than the general-purpose fitter.
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
        // ml reaches the unweighted least-squares minimum, so the comparison below is ml's.
        name: `${label}: 1 % of u(f0) / worst distance of ml's f0 from the unweighted minimum`,
        value: (0.01 * median(oursU)) / Math.max(...mlOffMinimum, Number.MIN_VALUE),
        floor: 1,
      },
      {
        name: `${label}: mean f0 error over ${sweeps} sweeps, unweighted (ml's minimum) / ours`,
        value: mean(unweightedErr) / mean(weightedErr),
        // At equal or smaller f0 error than the general-purpose fitter.
        floor: 1,
      },
    );
  }
  // Complex traces through a cable (electrical delay 0, 2 and 5 ns, QL 2200, 2 dB, 801 points):
  // the whole fit with the model chosen from the data (both models fitted, judged), and its f0
  // error against its own u(f0).
  for (const delayS of [0, 2e-9, 5e-9]) {
    const w = F0 / 2200;
    const traces = ML_SEEDS.map((seed) => {
      const truth = F0 + (seed - 5) * 0.03 * w;
      return {
        truth,
        s: complexSweep([{ f0Hz: truth, loadedQ: 2200, depthDb: 2, rotationRad: 0.2 }], {
          startHz: F0 - 6 * w,
          stopHz: F0 + 6 * w,
          points: 801,
          seed,
          delayS,
          tilt: 0.05,
          noise: 1e-3,
        }),
      };
    });
    const ms: number[] = [];
    const errorInU: number[] = [];
    for (const { truth, s } of traces) {
      const r = timePerRun(() => fitResonances({ kind: 'complex', ...s }));
      ms.push(r.ms);
      errorInU.push(Math.abs(r.value.main.f0Hz - truth) / r.value.main.f0UncertaintyHz);
    }
    const label = `complex, ${delayS * 1e9} ns delay, 801 pts`;
    out.push(
      {
        name: `${label}: whole fitResonances per second (both models, judged)`,
        value: 1000 / median(ms),
        floor: 5,
      },
      { name: `${label}: 4 / worst f0 error in units of u(f0)`, value: 4 / Math.max(...errorInU), floor: 1 },
    );
  }
  return out;
}
