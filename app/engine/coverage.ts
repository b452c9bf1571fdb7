// The lab's band coverage: the span cut at every meter's band edge, each piece with the meters
// whose band covers all of it and which of those can be used, neighbouring pieces with the same
// meters joined. A piece no usable meter covers is a gap (common practice: a band only counts as
// covered by an instrument that may be used on it today).

/** A meter as coverage sees it. */
export interface CoverageMeter {
  assetId: string;
  minHz: number;
  maxHz: number;
  /** In service, checked and not overdue. */
  usable: boolean;
  /** Why not, when not usable ("quarantined", "never checked", "overdue"...). */
  why: string;
}

export interface CoverageSegment {
  fromHz: number;
  toHz: number;
  /** Meters whose band covers the whole segment. */
  meters: string[];
  /** Of those, the usable ones. */
  usable: string[];
  gap: boolean;
  note: string;
}

/** The segments of [fromHz, toHz], in increasing frequency, meters in the order given. */
export function coverageSegments(
  meters: readonly CoverageMeter[],
  fromHz: number,
  toHz: number,
): CoverageSegment[] {
  const cuts = new Set<number>([fromHz, toHz]);
  for (const m of meters) {
    for (const f of [m.minHz, m.maxHz]) if (f > fromHz && f < toHz) cuts.add(f);
  }
  const edges = [...cuts].sort((a, b) => a - b);
  const segments: CoverageSegment[] = [];
  for (let i = 1; i < edges.length; i++) {
    const from = edges[i - 1] as number;
    const to = edges[i] as number;
    const cover = meters.filter((m) => m.minHz <= from && m.maxHz >= to);
    const ok = cover.filter((m) => m.usable).map((m) => m.assetId);
    const names = cover.map((m) => m.assetId);
    const prev = segments[segments.length - 1];
    if (prev && prev.meters.join() === names.join() && prev.usable.join() === ok.join()) {
      prev.toHz = to;
      continue;
    }
    const unusable = cover.filter((m) => !m.usable).map((m) => `${m.assetId} ${m.why}`);
    segments.push({
      fromHz: from,
      toHz: to,
      meters: names,
      usable: ok,
      gap: ok.length === 0,
      note: ok.length
        ? `covered by ${ok.join(', ')}${unusable.length ? ` (also ${unusable.join(', ')})` : ''}`
        : names.length
          ? `gap: only ${unusable.join(', ')}`
          : 'gap: no meter',
    });
  }
  return segments;
}
