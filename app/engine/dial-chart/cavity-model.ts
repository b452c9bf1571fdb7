// Physical cavity models of a division dial's chart (micrometer divisions -> frequency), fitted by
// least squares to check points, with their residuals.
// Sources:
// - Cylindrical TE011 cavity tuned by a plunger: f^2 = (c p'01 / (2 pi a))^2 + (c / 2)^2 / L^2
//   (Pozar, Microwave Engineering, 4th ed., 6.7, with l = 1); the cavity length L is linear in the
//   dial, L = s (d - d0), so f^2 = A + C / (d - d0)^2.
// - Capacitively loaded coaxial cavity (a quarter-wave line shortened by an end capacitance C):
//   resonance where Z0 tan(2 pi f l / c) = 1 / (2 pi f C) (Pozar 6.1-6.2, transmission-line
//   resonators), with l(d) = l0 + k d. With theta = 2 pi f l / c and tau = Z0 C, theta tan(theta) =
//   l / (c tau), solved on the fundamental branch 0 < theta < pi/2.

import { frequencyAtDivisions } from '../chart';
import { levenbergMarquardt, type LsqProblem } from '../lsq';
import type { ChartPoint } from '../model';
import { BESSEL_J0_PRIME_ZERO_1, SPEED_OF_LIGHT_M_PER_S } from '../waveguide';
import type { DialModel, DialResidual } from './types';

const C = SPEED_OF_LIGHT_M_PER_S;

/** Fundamental root of theta tan(theta) = kappa on (0, pi/2) (bisection: monotone, always brackets). */
function thetaTanRoot(kappa: number): number {
  let lo = 0;
  let hi = Math.PI / 2;
  for (let i = 0; i < 100; i++) {
    const mid = (lo + hi) / 2;
    if (mid * Math.tan(mid) < kappa) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

export function modelFrequencyHz(model: DialModel, divisions: number): number {
  switch (model.kind) {
    case 'cylindrical-te011': {
      const x = divisions - model.d0;
      return Math.sqrt(model.aHz2 + model.cHz2Div2 / (x * x));
    }
    case 'coaxial-loaded': {
      const l = model.l0M + model.kMPerDiv * divisions;
      if (!(l > 0)) return NaN;
      const theta = thetaTanRoot(l / (C * model.tauS));
      return (C * theta) / (2 * Math.PI * l);
    }
    case 'monotone-interpolant':
      return frequencyAtDivisions(model.knots, divisions, 'divisions');
  }
}

export function residualsOf(points: ChartPoint[], at: (d: number) => number): DialResidual[] {
  return points.map((p) => {
    const fittedHz = at(p.divisions);
    const residualHz = p.frequencyHz - fittedHz;
    return {
      divisions: p.divisions,
      frequencyHz: p.frequencyHz,
      fittedHz,
      residualHz,
      residualPpm: (residualHz / p.frequencyHz) * 1e6,
    };
  });
}

export function stats(res: DialResidual[]): { rms: number; max: number } {
  let s = 0;
  let m = 0;
  for (const r of res) {
    s += r.residualPpm * r.residualPpm;
    m = Math.max(m, Math.abs(r.residualPpm));
  }
  return { rms: Math.sqrt(s / res.length), max: m };
}

/** Least-squares fit of a 3-parameter model in normalized parameters; residuals relative (ppm/1e6). */
function fitModel(
  points: ChartPoint[],
  start: number[],
  build: (p: ArrayLike<number>) => DialModel | null,
): DialModel | null {
  const n = points.length;
  const problem: LsqProblem = {
    rows: n,
    params: start.length,
    evaluate(p, r, jac) {
      const model = build(p);
      if (!model) return false;
      const base = new Float64Array(n);
      for (let i = 0; i < n; i++) {
        const pt = points[i] as ChartPoint;
        const v = modelFrequencyHz(model, pt.divisions);
        if (!Number.isFinite(v)) return false;
        base[i] = v;
        r[i] = (pt.frequencyHz - v) / pt.frequencyHz;
      }
      if (jac) {
        // Central differences: three parameters and a handful of points, so this costs nothing.
        for (let k = 0; k < p.length; k++) {
          const h = 1e-6 * Math.max(1, Math.abs(p[k] as number));
          const up = Float64Array.from(p);
          const down = Float64Array.from(p);
          up[k] = (p[k] as number) + h;
          down[k] = (p[k] as number) - h;
          const mu = build(up);
          const md = build(down);
          for (let i = 0; i < n; i++) {
            const pt = points[i] as ChartPoint;
            const fu = mu ? modelFrequencyHz(mu, pt.divisions) : NaN;
            const fd = md ? modelFrequencyHz(md, pt.divisions) : NaN;
            const d = (fu - fd) / (2 * h) / pt.frequencyHz;
            jac[i * p.length + k] = Number.isFinite(d) ? d : 0;
          }
        }
      }
      return true;
    },
  };
  try {
    const r = levenbergMarquardt(problem, start, { maxIterations: 300 });
    return build(r.params);
  } catch {
    return null;
  }
}

export function fitTe011(points: ChartPoint[]): DialModel | null {
  const ds = points.map((p) => p.divisions);
  const dMin = Math.min(...ds);
  const dMax = Math.max(...ds);
  const span = dMax - dMin;
  const fRef = points[0]?.frequencyHz ?? 1;
  // Start: scan d0 on both sides of the data; for each, f^2 is linear in 1 / (d - d0)^2.
  let best: { err: number; d0: number; a: number; c: number } | null = null;
  for (const side of [-1, 1]) {
    for (let k = 0; k < 200; k++) {
      const gap = span * 0.02 * 1.05 ** k;
      const d0 = side < 0 ? dMin - gap : dMax + gap;
      let s1 = 0;
      let sx = 0;
      let sxx = 0;
      let sy = 0;
      let sxy = 0;
      for (const p of points) {
        const x = 1 / (p.divisions - d0) ** 2;
        const y = (p.frequencyHz / fRef) ** 2;
        s1 += 1;
        sx += x;
        sxx += x * x;
        sy += y;
        sxy += x * y;
      }
      const det = s1 * sxx - sx * sx;
      if (!(det > 0)) continue;
      const c = (s1 * sxy - sx * sy) / det;
      const a = (sy - c * sx) / s1;
      if (!(c > 0)) continue;
      let err = 0;
      for (const p of points) {
        const v = a + c / (p.divisions - d0) ** 2;
        if (!(v > 0)) {
          err = Infinity;
          break;
        }
        err += (Math.sqrt(v) - p.frequencyHz / fRef) ** 2;
      }
      if (!best || err < best.err) best = { err, d0, a, c };
    }
  }
  if (!best) return null;
  const side = best.d0 < dMin ? -1 : 1;
  const build = (p: ArrayLike<number>): DialModel | null => {
    const a = (p[0] as number) * fRef * fRef;
    const c = (p[1] as number) * fRef * fRef * span * span;
    const d0 = (p[2] as number) * span + dMin;
    if (!(c > 0) || (side < 0 ? d0 >= dMin : d0 <= dMax)) return null;
    const radius = a > 0 ? (C * BESSEL_J0_PRIME_ZERO_1) / (2 * Math.PI * Math.sqrt(a)) : null;
    return { kind: 'cylindrical-te011', aHz2: a, cHz2Div2: c, d0, equivalentRadiusM: radius };
  };
  return fitModel(points, [best.a, best.c / (span * span), (best.d0 - dMin) / span], build);
}

export function fitCoaxial(points: ChartPoint[]): DialModel | null {
  const ds = points.map((p) => p.divisions);
  const dMin = Math.min(...ds);
  const span = Math.max(...ds) - dMin;
  // Start: for each trial tau, each point's line length follows from its frequency; l should be
  // linear in d. Keep the tau whose lengths lie best on a line.
  let best: { err: number; tau: number; l0: number; k: number } | null = null;
  const fMean = points.reduce((s, p) => s + p.frequencyHz, 0) / points.length;
  for (let e = -3; e <= 3; e += 0.02) {
    const tau = 10 ** e / (2 * Math.PI * fMean);
    const ls = points.map(
      (p) => (C / (2 * Math.PI * p.frequencyHz)) * Math.atan(1 / (2 * Math.PI * p.frequencyHz * tau)),
    );
    let s1 = 0;
    let sx = 0;
    let sxx = 0;
    let sy = 0;
    let sxy = 0;
    points.forEach((p, i) => {
      const x = p.divisions - dMin;
      const y = ls[i] as number;
      s1 += 1;
      sx += x;
      sxx += x * x;
      sy += y;
      sxy += x * y;
    });
    const det = s1 * sxx - sx * sx;
    if (!(det > 0)) continue;
    const k = (s1 * sxy - sx * sy) / det;
    const l0 = (sy - k * sx) / s1;
    let err = 0;
    points.forEach((p, i) => {
      const l = l0 + k * (p.divisions - dMin);
      err += ((l - (ls[i] as number)) / (ls[i] as number)) ** 2;
    });
    if (!best || err < best.err) best = { err, tau, l0, k };
  }
  if (!best) return null;
  const lScale = Math.abs(best.l0) || 0.01;
  const tauScale = best.tau;
  const build = (p: ArrayLike<number>): DialModel | null => {
    const l0 = (p[0] as number) * lScale;
    const k = ((p[1] as number) * lScale) / span;
    const tau = (p[2] as number) * tauScale;
    if (!(tau > 0)) return null;
    // l0 here is the length at dMin; store it at zero divisions.
    return { kind: 'coaxial-loaded', l0M: l0 - k * dMin, kMPerDiv: k, tauS: tau };
  };
  return fitModel(points, [best.l0 / lScale, (best.k * span) / lScale, 1], build);
}
