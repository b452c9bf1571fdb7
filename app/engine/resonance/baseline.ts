// What the off-resonance part of a trace says before and after a fit: which points lie clear of
// every dip, the noise of the level there (from second differences, which a straight or gently
// curved baseline does not disturb: var(y[i-1] - 2 y[i] + y[i+1]) = 6 s^2 for white noise), the
// electrical delay from the slope of the unwrapped phase (a cable of delay tau turns the phase by
// -2 pi f tau), and whether the phase carries the resonance at all.
// The phase test: to first order in the circle diameter d, the deviation of S / S_V from 1 is
// -d e^{j theta} / (1 + j u), so the phase and the log-magnitude each take the components
// L = 1 / (1 + u^2) and u L, rotated by theta, with equal energy: a real Q-circle shows in the
// phase about as strongly as in the magnitude, whatever its rotation (MAT 58 section 2.2 for the
// circle; the decomposition is elementary). A phase that holds no such component is constant or
// noise, and only the magnitude model applies.

import type { Candidate } from './candidates';
import { median } from './trace';

/**
 * Points further than `reach` linewidths from every candidate dip; `clear` says whether the sweep
 * has such points at 3 linewidths (else the mask falls back to 1.5 linewidths, then to every point).
 */
export function offResonanceMask(
  f: Float64Array,
  candidates: Candidate[],
): { mask: Uint8Array; clear: boolean } {
  const n = f.length;
  for (const reach of [3, 1.5]) {
    const mask = new Uint8Array(n);
    let kept = 0;
    for (let i = 0; i < n; i++) {
      const v = f[i] as number;
      if (candidates.every((c) => Math.abs(v - (f[c.index] as number)) > reach * c.widthHz)) {
        mask[i] = 1;
        kept++;
      }
    }
    if (kept >= 8) return { mask, clear: reach === 3 };
  }
  return { mask: new Uint8Array(n).fill(1), clear: false };
}

/** Standard deviation of white noise on y from the second differences of points in the mask. */
export function secondDifferenceNoise(y: ArrayLike<number>, mask: Uint8Array): number {
  const d: number[] = [];
  for (let i = 1; i + 1 < y.length; i++) {
    if (!mask[i - 1] || !mask[i] || !mask[i + 1]) continue;
    d.push((y[i - 1] as number) - 2 * (y[i] as number) + (y[i + 1] as number));
  }
  if (d.length < 5)
    for (let i = 1; i + 1 < y.length; i++)
      d.push((y[i - 1] as number) - 2 * (y[i] as number) + (y[i + 1] as number));
  const m = median(d);
  return (1.4826 * median(d.map((v) => Math.abs(v - m)))) / Math.sqrt(6);
}

export interface PhaseBaseline {
  /** Electrical delay from the off-resonance phase slope, s. */
  delayS: number;
  /** Phase turn of that delay across the sweep, degrees. */
  turnDeg: number;
  /** Unwrapped phase less its off-resonance straight line, rad. */
  residualRad: Float64Array;
  /** Noise of the phase at the baseline, rad. */
  noiseRad: number;
}

/** Straight line through the unwrapped phase of the off-resonance points. */
export function phaseBaseline(
  f: Float64Array,
  re: ArrayLike<number>,
  im: ArrayLike<number>,
  mask: Uint8Array,
): PhaseBaseline {
  const n = f.length;
  const phase = new Float64Array(n);
  let previous = 0;
  for (let i = 0; i < n; i++) {
    let v = Math.atan2(im[i] as number, re[i] as number);
    if (i > 0) v += 2 * Math.PI * Math.round((previous - v) / (2 * Math.PI));
    phase[i] = v;
    previous = v;
  }
  const fc = f[0] as number;
  let sw = 0;
  let sx = 0;
  let sy = 0;
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < n; i++) {
    if (!mask[i]) continue;
    const x = (f[i] as number) - fc;
    const y = phase[i] as number;
    sw += 1;
    sx += x;
    sy += y;
    sxx += x * x;
    sxy += x * y;
  }
  const det = sw * sxx - sx * sx;
  const slope = det > 0 ? (sw * sxy - sx * sy) / det : 0;
  const intercept = (sy - slope * sx) / Math.max(sw, 1);
  const residualRad = new Float64Array(n);
  for (let i = 0; i < n; i++)
    residualRad[i] = (phase[i] as number) - intercept - slope * ((f[i] as number) - fc);
  const span = (f[n - 1] as number) - fc;
  return {
    delayS: -slope / (2 * Math.PI),
    turnDeg: (Math.abs(slope) * span * 180) / Math.PI,
    residualRad,
    noiseRad: secondDifferenceNoise(phase, mask),
  };
}

/**
 * Amplitude of the Q-circle's signature in a deviation (phase, or relative magnitude) within two
 * linewidths of f0: the least-squares amplitude of L and u L, and its standard uncertainty.
 */
export function circleSignature(
  f: Float64Array,
  deviation: ArrayLike<number>,
  f0Hz: number,
  loadedQ: number,
  noise: number,
): { amplitude: number; uncertainty: number } {
  const width = f0Hz / loadedQ;
  let sll = 0;
  let suu = 0;
  let sl = 0;
  let su = 0;
  let s1 = 0;
  let sy = 0;
  let sly = 0;
  let suy = 0;
  for (let i = 0; i < f.length; i++) {
    const fi = f[i] as number;
    if (Math.abs(fi - f0Hz) > 2 * width) continue;
    const u = (2 * (fi - f0Hz)) / width;
    const l = 1 / (1 + u * u);
    const ul = u * l;
    const y = deviation[i] as number;
    sll += l * l;
    suu += ul * ul;
    sl += l;
    su += ul;
    s1 += 1;
    sy += y;
    sly += l * y;
    suy += ul * y;
  }
  if (s1 < 4) return { amplitude: 0, uncertainty: Infinity };
  // Remove the window's mean (a constant offset is not the circle's), then project.
  const cl = sll - (sl * sl) / s1;
  const cu = suu - (su * su) / s1;
  const a = (sly - (sl * sy) / s1) / Math.max(cl, 1e-300);
  const b = (suy - (su * sy) / s1) / Math.max(cu, 1e-300);
  return {
    amplitude: Math.hypot(a, b),
    uncertainty: noise * Math.sqrt(1 / Math.max(cl, 1e-300) + 1 / Math.max(cu, 1e-300)),
  };
}
