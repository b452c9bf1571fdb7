// The lab's band coverage for the strip of the register, as the service's `coverage` operation
// answers it (a meter counts only when in service, checked and not overdue), turned into
// stretches to draw on a logarithmic frequency axis of about 1 to 110 GHz: covered, held only by
// meters not usable now, or no meter at all.
import type { RegisterRow } from '../../../app/api/contract';
import type { CoverageReport } from '../../../app/api/contract-history';
import { effectiveDue } from './registerFilters';

export const COVERAGE_MIN_HZ = 1e9;
export const COVERAGE_MAX_HZ = 110e9;

export type CoverageKind = 'usable' | 'unusable' | 'gap';

export interface StripSegment {
  fromHz: number;
  toHz: number;
  kind: CoverageKind;
  /** Usable meters for 'usable'; the covering meters that are not usable for 'unusable'. */
  meters: string[];
}

/** The report's segments by kind, neighbours of the same kind merged: the strip shows what a
 * user can rely on, not every band edge. */
export function stripSegments(report: CoverageReport): StripSegment[] {
  const out: StripSegment[] = [];
  for (const s of report.segments) {
    const kind: CoverageKind = s.usable.length ? 'usable' : s.meters.length ? 'unusable' : 'gap';
    const meters = kind === 'usable' ? s.usable : s.meters.filter((m) => !s.usable.includes(m));
    const last = out[out.length - 1];
    if (last && last.kind === kind && last.toHz === s.fromHz) {
      last.toHz = s.toHz;
      for (const m of meters) if (!last.meters.includes(m)) last.meters.push(m);
    } else {
      out.push({ fromHz: s.fromHz, toHz: s.toHz, kind, meters: [...meters] });
    }
  }
  return out;
}

/** Why a meter does not count towards coverage, in the words the service's note uses. */
export function notUsableBecause(row: Pick<RegisterRow, 'state' | 'daysToDue'> | undefined): string {
  if (!row) return '';
  if (row.state !== 'in-service') return row.state;
  if (row.daysToDue === null) return 'never checked';
  return effectiveDue(row) === 'overdue' ? 'overdue' : '';
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
