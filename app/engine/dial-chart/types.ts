// Shared shapes of a division dial's chart fit: the models, their residuals and the error it throws.
import type { ChartPoint } from '../model';

export type DialModelKind = 'cylindrical-te011' | 'coaxial-loaded' | 'monotone-interpolant';

export interface DialResidual {
  divisions: number;
  frequencyHz: number;
  fittedHz: number;
  residualHz: number;
  residualPpm: number;
}

export interface DialCandidate {
  model: DialModelKind;
  accepted: boolean;
  rmsResidualPpm: number | null;
  maxResidualPpm: number | null;
  reason: string;
}

export type DialModel =
  | {
      kind: 'cylindrical-te011';
      aHz2: number;
      cHz2Div2: number;
      d0: number;
      equivalentRadiusM: number | null;
    }
  | { kind: 'coaxial-loaded'; l0M: number; kMPerDiv: number; tauS: number }
  | { kind: 'monotone-interpolant'; knots: ChartPoint[] };

export interface DialChartFit {
  model: DialModel;
  residuals: DialResidual[];
  rmsResidualPpm: number;
  maxResidualPpm: number;
  candidates: DialCandidate[];
  /** Range of divisions the chart covers (the points'). */
  minDivisions: number;
  maxDivisions: number;
  notes: string[];
}

export class DialChartError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'DialChartError';
  }
}
