// The lab's band coverage (app/engine/coverage.ts): the span cut at band edges, pieces joined
// where the same meters cover them, gaps where no usable meter does (common practice: a band
// counts as covered only by an instrument that may be used on it today).
import { describe, expect, it } from 'vitest';
import { coverageSegments, type CoverageMeter } from '../../app/engine/coverage';

const meter = (assetId: string, minGHz: number, maxGHz: number, usable = true, why = ''): CoverageMeter => ({
  assetId,
  minHz: minGHz * 1e9,
  maxHz: maxGHz * 1e9,
  usable,
  why,
});

describe('band coverage', () => {
  it('cuts at band edges, joins equal pieces and names the gaps', () => {
    const s = coverageSegments(
      [meter('A', 8, 12), meter('B', 10, 18, false, 'overdue'), meter('C', 12, 14)],
      1e9,
      20e9,
    );
    expect(s.map((x) => [x.fromHz / 1e9, x.toHz / 1e9, x.gap, x.note])).toEqual([
      [1, 8, true, 'gap: no meter'],
      [8, 10, false, 'covered by A'],
      [10, 12, false, 'covered by A (also B overdue)'],
      [12, 14, false, 'covered by C (also B overdue)'],
      [14, 18, true, 'gap: only B overdue'],
      [18, 20, true, 'gap: no meter'],
    ]);
    // The span's ends are the whole answer's: nothing outside them.
    expect(s[0]!.fromHz).toBe(1e9);
    expect(s[s.length - 1]!.toHz).toBe(20e9);
  });

  it('joins neighbouring pieces covered by the same meters', () => {
    const s = coverageSegments([meter('A', 2, 6), meter('B', 2, 6)], 2e9, 6e9);
    expect(s).toHaveLength(1);
    expect(s[0]).toMatchObject({ meters: ['A', 'B'], usable: ['A', 'B'], gap: false });
  });
});
