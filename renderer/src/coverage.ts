// The lab's band coverage on a logarithmic frequency axis: which stretches of about 1 to
// 110 GHz an in-service meter covers, which only a quarantined or withdrawn one, and the gaps.
import type { RegisterRow } from '../../app/api/contract';

export const COVERAGE_MIN_HZ = 1e9;
export const COVERAGE_MAX_HZ = 110e9;

export type CoverageKind = 'usable' | 'unusable' | 'gap';

export interface CoverageSegment {
  fromHz: number;
  toHz: number;
  kind: CoverageKind;
  /** Asset ids of the meters covering this stretch (in-service ones for 'usable'). */
  meters: string[];
}

/** Splits [minHz, maxHz] at every band edge and merges neighbours of the same kind. */
export function coverage(
  rows: Pick<RegisterRow, 'assetId' | 'minHz' | 'maxHz' | 'state'>[],
  minHz = COVERAGE_MIN_HZ,
  maxHz = COVERAGE_MAX_HZ,
): CoverageSegment[] {
  const edges = new Set<number>([minHz, maxHz]);
  for (const r of rows) {
    for (const e of [r.minHz, r.maxHz]) if (e > minHz && e < maxHz) edges.add(e);
  }
  const sorted = [...edges].sort((a, b) => a - b);
  const out: CoverageSegment[] = [];
  for (let i = 0; i + 1 < sorted.length; i++) {
    const a = sorted[i] as number;
    const b = sorted[i + 1] as number;
    // The geometric middle: on a log axis it is the middle of what the eye sees.
    const mid = Math.sqrt(a * b);
    const over = rows.filter((r) => r.minHz <= mid && mid <= r.maxHz);
    const inService = over.filter((r) => r.state === 'in-service');
    const kind: CoverageKind = inService.length ? 'usable' : over.length ? 'unusable' : 'gap';
    const meters = (kind === 'usable' ? inService : over).map((r) => r.assetId);
    const last = out[out.length - 1];
    if (last && last.kind === kind) {
      last.toHz = b;
      for (const m of meters) if (!last.meters.includes(m)) last.meters.push(m);
    } else {
      out.push({ fromHz: a, toHz: b, kind, meters: [...meters] });
    }
  }
  return out;
}

/** Position of a frequency along a log axis from minHz to maxHz, 0 to 1. */
export function logPosition(hz: number, minHz = COVERAGE_MIN_HZ, maxHz = COVERAGE_MAX_HZ): number {
  const clamped = Math.min(Math.max(hz, minHz), maxHz);
  return Math.log(clamped / minHz) / Math.log(maxHz / minHz);
}

/** Greedy lanes so overlapping bands sit on separate rows; rows keep their register order. */
export function packLanes<T extends { minHz: number; maxHz: number }>(bands: T[]): T[][] {
  const lanes: { end: number; items: T[] }[] = [];
  for (const b of [...bands].sort((x, y) => x.minHz - y.minHz)) {
    // Touching bands (one ends where the next starts) share a lane.
    const lane = lanes.find((l) => l.end <= b.minHz);
    if (lane) {
      lane.items.push(b);
      lane.end = b.maxHz;
    } else lanes.push({ end: b.maxHz, items: [b] });
  }
  return lanes.map((l) => l.items);
}
