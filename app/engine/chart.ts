// A divisions meter's calibration chart as a smooth, monotone curve: divisions -> frequency, its
// local slope (to turn a dial resolution in divisions into Hz), and the inverse for generating data.
// Source: F. N. Fritsch and R. E. Carlson, "Monotone piecewise cubic interpolation", SIAM J. Numer.
// Anal. 17(2), 238-246 (1980): piecewise cubic Hermite with tangents limited to the region
// alpha^2 + beta^2 <= 9, which keeps each piece monotone.

import type { ChartPoint } from './model';

/** A chart ready for evaluation: knots sorted by divisions, with Fritsch-Carlson tangents. */
export interface MonotoneChart {
  readonly divisions: readonly number[];
  readonly frequencyHz: readonly number[];
  /** dHz/ddiv at each knot. */
  readonly tangentsHzPerDivision: readonly number[];
  /** True when frequency rises with divisions. */
  readonly increasing: boolean;
}

export class ChartError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'ChartError';
  }
}

/** What is wrong with a chart, or null if it can be used. */
export function chartProblem(points: readonly ChartPoint[] | undefined, field = 'chart'): string | null {
  if (!points || points.length < 2) {
    return `${field}: a chart needs at least 2 points (it has ${points ? points.length : 0})`;
  }
  for (const [i, p] of points.entries()) {
    if (!Number.isFinite(p.divisions) || !Number.isFinite(p.frequencyHz)) {
      return `${field}[${i}]: divisions and frequencyHz must be finite numbers`;
    }
    if (p.frequencyHz <= 0) return `${field}[${i}]: frequencyHz must be positive (got ${p.frequencyHz})`;
  }
  const sorted = [...points].sort((a, b) => a.divisions - b.divisions);
  let sign = 0;
  for (let i = 1; i < sorted.length; i++) {
    const a = sorted[i - 1] as ChartPoint;
    const b = sorted[i] as ChartPoint;
    if (a.divisions === b.divisions) return `${field}: two points at ${a.divisions} divisions`;
    const step = Math.sign(b.frequencyHz - a.frequencyHz);
    if (step === 0) {
      return `${field}: frequency does not change between ${a.divisions} and ${b.divisions} divisions; a chart must be strictly monotone`;
    }
    if (sign !== 0 && step !== sign) {
      return `${field}: frequency is not monotone in divisions (it turns near ${a.divisions} divisions)`;
    }
    sign = step;
  }
  return null;
}

/** Builds the interpolant; throws ChartError for fewer than 2 points or a non-monotone chart. */
export function createChart(points: readonly ChartPoint[], field = 'chart'): MonotoneChart {
  const problem = chartProblem(points, field);
  if (problem) throw new ChartError(problem);
  const sorted = [...points].sort((a, b) => a.divisions - b.divisions);
  const x = sorted.map((p) => p.divisions);
  const y = sorted.map((p) => p.frequencyHz);
  const count = x.length;
  const secants: number[] = [];
  for (let k = 0; k < count - 1; k++) {
    secants.push(((y[k + 1] as number) - (y[k] as number)) / ((x[k + 1] as number) - (x[k] as number)));
  }
  // Step 1 (initial tangents): the three-point difference formula, exact for a quadratic
  // (FC 1980 step 1 allows any initialization with the secants' sign). Inside: the derivative at x_k
  // of the parabola through x_{k-1}, x_k, x_{k+1}; at the ends: the one-sided three-point formula,
  // kept to the sign of the end secant and to 3 times it, so the end interval stays monotone.
  const m: number[] = new Array<number>(count).fill(0);
  const h: number[] = [];
  for (let k = 0; k < count - 1; k++) h.push((x[k + 1] as number) - (x[k] as number));
  const endTangent = (h0: number, h1: number, d0: number, d1: number): number => {
    const t = ((2 * h0 + h1) * d0 - h0 * d1) / (h0 + h1);
    if (Math.sign(t) !== Math.sign(d0)) return 0;
    if (Math.abs(t) > 3 * Math.abs(d0)) return 3 * d0;
    return t;
  };
  if (count === 2) {
    m[0] = secants[0] as number;
    m[1] = secants[0] as number;
  } else {
    m[0] = endTangent(h[0] as number, h[1] as number, secants[0] as number, secants[1] as number);
    m[count - 1] = endTangent(
      h[count - 2] as number,
      h[count - 3] as number,
      secants[count - 2] as number,
      secants[count - 3] as number,
    );
  }
  for (let k = 1; k < count - 1; k++) {
    const hPrev = h[k - 1] as number;
    const hNext = h[k] as number;
    m[k] = (hNext * (secants[k - 1] as number) + hPrev * (secants[k] as number)) / (hPrev + hNext);
  }
  // Step 2: limit the tangents of each interval to the circle alpha^2 + beta^2 <= 9 (FC 1980, the
  // sufficient condition for monotonicity, applied interval by interval).
  for (let k = 0; k < count - 1; k++) {
    const delta = secants[k] as number;
    const a = (m[k] as number) / delta;
    const b = (m[k + 1] as number) / delta;
    const r2 = a * a + b * b;
    if (r2 > 9) {
      const tau = 3 / Math.sqrt(r2);
      m[k] = tau * a * delta;
      m[k + 1] = tau * b * delta;
    }
  }
  return {
    divisions: x,
    frequencyHz: y,
    tangentsHzPerDivision: m,
    increasing: (y[count - 1] as number) > (y[0] as number),
  };
}

function asChart(chart: MonotoneChart | readonly ChartPoint[]): MonotoneChart {
  return Array.isArray(chart) ? createChart(chart as readonly ChartPoint[]) : (chart as MonotoneChart);
}

/** Index k of the interval [x_k, x_{k+1}] holding divisions; throws when outside the chart. */
function intervalOf(chart: MonotoneChart, divisions: number, field: string): number {
  const x = chart.divisions;
  const first = x[0] as number;
  const last = x[x.length - 1] as number;
  if (!Number.isFinite(divisions))
    throw new ChartError(`${field}: ${String(divisions)} is not a finite dial reading`);
  if (divisions < first || divisions > last) {
    throw new ChartError(
      `${field}: ${divisions} divisions is outside the chart's range ${first} to ${last} divisions`,
    );
  }
  let lo = 0;
  let hi = x.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if ((x[mid] as number) <= divisions) lo = mid;
    else hi = mid;
  }
  return lo;
}

function hermite(
  chart: MonotoneChart,
  k: number,
  divisions: number,
): { valueHz: number; slopeHzPerDivision: number } {
  const x0 = chart.divisions[k] as number;
  const x1 = chart.divisions[k + 1] as number;
  const y0 = chart.frequencyHz[k] as number;
  const y1 = chart.frequencyHz[k + 1] as number;
  const m0 = chart.tangentsHzPerDivision[k] as number;
  const m1 = chart.tangentsHzPerDivision[k + 1] as number;
  const h = x1 - x0;
  const t = (divisions - x0) / h;
  const t2 = t * t;
  const t3 = t2 * t;
  const raw =
    (2 * t3 - 3 * t2 + 1) * y0 + (t3 - 2 * t2 + t) * h * m0 + (-2 * t3 + 3 * t2) * y1 + (t3 - t2) * h * m1;
  // A monotone piece stays between its knot values; clamp away last-bit rounding excursions so
  // the curve is monotone in floating point too.
  const valueHz = Math.min(Math.max(raw, Math.min(y0, y1)), Math.max(y0, y1));
  const slopeHzPerDivision =
    ((6 * t2 - 6 * t) * y0 + (-6 * t2 + 6 * t) * y1) / h + (3 * t2 - 4 * t + 1) * m0 + (3 * t2 - 2 * t) * m1;
  return { valueHz, slopeHzPerDivision };
}

/** Frequency at a dial reading in divisions. Throws ChartError outside the chart's range. */
export function frequencyAtDivisions(
  chart: MonotoneChart | readonly ChartPoint[],
  divisions: number,
  field = 'reading',
): number {
  const c = asChart(chart);
  return hermite(c, intervalOf(c, divisions, field), divisions).valueHz;
}

/** Local slope dHz/ddiv at a dial reading (negative for a chart whose frequency falls). */
export function slopeHzPerDivision(
  chart: MonotoneChart | readonly ChartPoint[],
  divisions: number,
  field = 'reading',
): number {
  const c = asChart(chart);
  return hermite(c, intervalOf(c, divisions, field), divisions).slopeHzPerDivision;
}

/** Dial reading in divisions at which the chart gives frequencyHz (bisection; for generating data). */
export function divisionsAtFrequency(
  chart: MonotoneChart | readonly ChartPoint[],
  frequencyHz: number,
  field = 'frequency',
): number {
  const c = asChart(chart);
  const y = c.frequencyHz;
  const lowHz = Math.min(y[0] as number, y[y.length - 1] as number);
  const highHz = Math.max(y[0] as number, y[y.length - 1] as number);
  if (!Number.isFinite(frequencyHz) || frequencyHz < lowHz || frequencyHz > highHz) {
    throw new ChartError(
      `${field}: ${String(frequencyHz)} Hz is outside the chart's range ${lowHz} Hz to ${highHz} Hz`,
    );
  }
  // Find the knot interval first (the knots are monotone), then bisect inside it, where the
  // Fritsch-Carlson piece is monotone.
  let k = 0;
  while (k < y.length - 2) {
    const next = y[k + 1] as number;
    if (c.increasing ? frequencyHz <= next : frequencyHz >= next) break;
    k++;
  }
  let lo = c.divisions[k] as number;
  let hi = c.divisions[k + 1] as number;
  for (let i = 0; i < 200 && hi - lo > 1e-13 * Math.max(1, Math.abs(hi)); i++) {
    const mid = (lo + hi) / 2;
    const value = hermite(c, k, mid).valueHz;
    if (c.increasing ? value < frequencyHz : value > frequencyHz) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}
