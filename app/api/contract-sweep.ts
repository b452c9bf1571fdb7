// Sweeps and dials: the resonance fit of a trace on its own, the swept points of a meter
// over its history (resonance, Q, depth, spurious responses), and a divisions meter's dial chart
// fitted from its check points with a physical cavity model.
import type { DipPlot } from '../engine/dipplot';
import type { ResonanceReport } from '../engine/resonance';
import type { ChartTableRow, DialChartFit } from '../engine/dial-chart';
import type { SweepRecord, SweepSummary } from '../../db/queries/sweeps';
import type { ChartQueryInput, FitTraceInput } from './schemas-sweep';

export type { SweepRecord, SweepSummary } from '../../db/queries/sweeps';

export interface TraceFit {
  /** What was read: format, response, points. */
  description: string;
  pointCount: number;
  report: ResonanceReport;
  /** Things the reader skipped or guessed (a second option line, extra columns...). */
  warnings: string[];
  /** The trace and the fitted main dip, thinned for a chart (levels in dB against the baseline). */
  plot: DipPlot;
}

export interface DialChartReport {
  assetId: string;
  fit: DialChartFit;
  /** Where the points came from: the newest check with points, or the meter's stored chart. */
  source: { kind: 'check'; checkId: number; date: string } | { kind: 'stored-chart' };
  pointCount: number;
  /** Printable table, divisions -> frequency at the meter's reference conditions. */
  stepDivisions: number;
  table: ChartTableRow[];
  /** The TE10 cut-off of the meter's standard waveguide, when its port names one (WR-xx). */
  guide: { size: string; cutoffHz: number } | null;
  /** A model is accepted within this many ppm (a quarter of the stated relative accuracy). */
  acceptPpm: number;
  notes: string[];
}

export interface SweepApi {
  /** Fits every dip of one trace (file text or typed points); nothing is stored. */
  fitTrace(input: FitTraceInput): Promise<TraceFit>;
  /** The swept points of a meter, oldest first, with their fitted resonance and spurious dips. */
  listSweeps(assetId: string): Promise<SweepSummary[]>;
  /** The sweeps of a check (its newest revision), with their raw traces. */
  getSweeps(checkId: number): Promise<SweepRecord[]>;
  /** The dial chart of a divisions meter fitted from its newest check, and a printable table. */
  getDialChart(input: ChartQueryInput): Promise<DialChartReport>;
}

export const SWEEP_OPERATIONS = {
  fitTrace: 'read',
  listSweeps: 'read',
  getSweeps: 'read',
  getDialChart: 'read',
} as const satisfies Record<keyof SweepApi, 'read' | 'write'>;
