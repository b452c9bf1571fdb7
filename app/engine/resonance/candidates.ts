// Candidate search: the dips of a trace before any fit, found against a robust straight baseline
// (iterated, the dips left out) where the smoothed fractional depth stands clear of the noise.
// Common practice; no published method is followed here.

import { median } from './trace';

/** A dip found in the trace before fitting: where, how deep, how wide. */
export interface Candidate {
  index: number;
  depth: number;
  widthHz: number;
  left: number;
  right: number;
}

/** Straight baseline through the trace with the dips left out (iterated, robust to them). */
export function robustBaseline(f: Float64Array, y: Float64Array): { level: Float64Array; sigma: number } {
  const n = f.length;
  const fc = f[0] as number;
  const span = (f[n - 1] as number) - fc;
  let mask = new Uint8Array(n).fill(1);
  let c0 = 0;
  let c1 = 0;
  for (let round = 0; round < 6; round++) {
    let sw = 0;
    let sx = 0;
    let sy = 0;
    let sxx = 0;
    let sxy = 0;
    for (let i = 0; i < n; i++) {
      if (!mask[i]) continue;
      const x = ((f[i] as number) - fc) / span;
      const v = y[i] as number;
      sw += 1;
      sx += x;
      sy += v;
      sxx += x * x;
      sxy += x * v;
    }
    const det = sw * sxx - sx * sx;
    c1 = det > 0 ? (sw * sxy - sx * sy) / det : 0;
    c0 = (sy - c1 * sx) / sw;
    const res: number[] = [];
    for (let i = 0; i < n; i++)
      if (mask[i]) res.push((y[i] as number) - (c0 + (c1 * ((f[i] as number) - fc)) / span));
    const sigma = 1.4826 * median(res.map(Math.abs)) || 1e-300;
    const next = new Uint8Array(n);
    let kept = 0;
    for (let i = 0; i < n; i++) {
      const r = (y[i] as number) - (c0 + (c1 * ((f[i] as number) - fc)) / span);
      if (r > -2.5 * sigma) {
        next[i] = 1;
        kept++;
      }
    }
    if (kept < Math.max(4, n / 10)) break;
    mask = next;
  }
  const level = new Float64Array(n);
  for (let i = 0; i < n; i++) level[i] = c0 + (c1 * ((f[i] as number) - fc)) / span;
  const res: number[] = [];
  for (let i = 0; i < n; i++) if (mask[i]) res.push((y[i] as number) - (level[i] as number));
  return { level, sigma: 1.4826 * median(res.map(Math.abs)) };
}

/** Finds the dips: regions where the smoothed fractional depth stands clear of the noise. */
export function findDips(f: Float64Array, power: Float64Array): { candidates: Candidate[]; noise: number } {
  const n = f.length;
  const { level } = robustBaseline(f, power);
  const depth = new Float64Array(n);
  for (let i = 0; i < n; i++) depth[i] = 1 - (power[i] as number) / Math.max(level[i] as number, 1e-300);
  // Noise of the fractional depth from first differences (insensitive to the dips themselves).
  const diffs: number[] = [];
  for (let i = 1; i < n; i++) diffs.push(Math.abs((depth[i] as number) - (depth[i - 1] as number)));
  const noise = (1.4826 * median(diffs)) / Math.SQRT2;
  const half = Math.floor(n / 1000);
  const smooth = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let s = 0;
    let c = 0;
    for (let k = Math.max(0, i - half); k <= Math.min(n - 1, i + half); k++) {
      s += depth[k] as number;
      c++;
    }
    smooth[i] = s / c;
  }
  const threshold = Math.max((6 * noise) / Math.sqrt(2 * half + 1), 0.01);
  const candidates: Candidate[] = [];
  // Further dips inside one region above the threshold, beside a deeper one: a local peak in
  // [lo, hi) that stands out of the valleys on both sides by the threshold and by 30 % of its depth
  // (a tail of the deeper dip only falls away from it, so it has no such valley).
  const collect = (lo: number, hi: number, m: number): void => {
    // The deepest local peak of the range: the largest value within m points either side, not at
    // an end of the range (there a deeper dip's tail only falls away).
    let peak = -1;
    for (let k = lo + m; k < hi - m; k++) {
      const v = smooth[k] as number;
      if (peak >= 0 && v <= (smooth[peak] as number)) continue;
      let isPeak = true;
      for (let q = k - m; q <= k + m && isPeak; q++) if ((smooth[q] as number) > v) isPeak = false;
      if (isPeak) peak = k;
    }
    if (peak < 0) return;
    const d = smooth[peak] as number;
    let leftValley = d;
    for (let k = lo; k <= peak; k++) leftValley = Math.min(leftValley, smooth[k] as number);
    let rightValley = d;
    for (let k = peak; k < hi; k++) rightValley = Math.min(rightValley, smooth[k] as number);
    if (d - Math.max(leftValley, rightValley) < Math.max(threshold, 0.3 * d)) return;
    const floor = Math.max(leftValley, rightValley);
    let left = peak;
    while (left > lo && (smooth[left] as number) > (d + floor) / 2) left--;
    let right = peak;
    while (right < hi - 1 && (smooth[right] as number) > (d + floor) / 2) right++;
    candidates.push({
      index: peak,
      depth: d,
      widthHz: Math.max((f[right] as number) - (f[left] as number), (f[1] as number) - (f[0] as number)),
      left,
      right,
    });
    collect(lo, left, m);
    collect(right + 1, hi, m);
  };
  let i = 0;
  while (i < n) {
    if ((smooth[i] as number) <= threshold / 2) {
      i++;
      continue;
    }
    let j = i;
    let peak = i;
    while (j < n && (smooth[j] as number) > threshold / 2) {
      if ((smooth[j] as number) > (smooth[peak] as number)) peak = j;
      j++;
    }
    const d = smooth[peak] as number;
    if (d > threshold) {
      let left = peak;
      while (left > 0 && (smooth[left] as number) > d / 2) left--;
      let right = peak;
      while (right < n - 1 && (smooth[right] as number) > d / 2) right++;
      candidates.push({
        index: peak,
        depth: d,
        widthHz: Math.max((f[right] as number) - (f[left] as number), (f[1] as number) - (f[0] as number)),
        left,
        right,
      });
      const m = Math.max(2, Math.floor((right - left) / 4));
      collect(i, left, m);
      collect(right + 1, j, m);
    }
    i = j;
  }
  candidates.sort((a, b) => b.depth - a.depth);
  return { candidates, noise };
}

/** Indices of the fit window of a dip: about +/- 6 linewidths, without the cores of other dips. */
export function windowOf(f: Float64Array, c: Candidate, others: Candidate[]): number[] {
  const center = f[c.index] as number;
  const reach = 6 * c.widthHz;
  const out: number[] = [];
  for (let i = 0; i < f.length; i++) {
    const v = f[i] as number;
    if (Math.abs(v - center) > reach) continue;
    if (others.some((o) => o !== c && Math.abs(v - (f[o.index] as number)) < 1.5 * o.widthHz)) continue;
    out.push(i);
  }
  return out;
}
