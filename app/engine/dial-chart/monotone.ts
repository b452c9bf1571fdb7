// The fallback chart of a division dial: a Fritsch-Carlson monotone cubic through the points
// (chart.ts), its residuals taken by leaving each interior point out, so the figure is not zero by
// construction.

import { frequencyAtDivisions } from '../chart';
import type { ChartPoint } from '../model';
import type { DialResidual } from './types';

/** Leave-one-out residuals of the monotone interpolant at interior points (ends: 0, exact). */
export function interpolantResiduals(points: ChartPoint[]): DialResidual[] {
  const sorted = [...points].sort((a, b) => a.divisions - b.divisions);
  return sorted.map((p, i) => {
    let fittedHz = p.frequencyHz;
    if (i > 0 && i < sorted.length - 1 && sorted.length >= 4) {
      const without = sorted.filter((_, j) => j !== i);
      fittedHz = frequencyAtDivisions(without, p.divisions, 'divisions');
    }
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
