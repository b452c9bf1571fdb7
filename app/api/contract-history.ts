// The history group of the LabApi: drift trends, interval suggestions, the fit-for-use answer
// and the lab's band coverage. All read-only: computed from stored checks on each call.
import type { MeterState, Phase } from '../engine/model';
import type { IntervalMethod } from '../engine/intervals';

export interface TrendFit {
  /** Observations in the current segment (since the last adjustment or step). */
  points: number;
  dof: number;
  /** Fitted error at the epoch (the newest check's date), ppm. */
  interceptPpm: number;
  slopePpmPerYear: number;
  uInterceptPpm: number;
  uSlopePpmPerYear: number;
  residualSdPpm: number;
  /** sqrt(reduced chi-square) against the points' stated uncertainties. */
  birgeRatio: number | null;
  fromDate: string;
}

export interface TrendObservation {
  date: string;
  phase: Phase;
  errorPpm: number;
  uPpm: number;
  /** Part of the current segment, used by the fit. */
  used: boolean;
}

export interface FrequencyTrend {
  frequencyHz: number;
  tolerancePpm: number;
  history: TrendObservation[];
  fit: TrendFit | null;
  /** Prediction of the next check at the due date (e-Handbook 4.5.1.2, 95 %). */
  atDue: {
    date: string;
    predictedPpm: number;
    halfWidthPpm: number;
    probabilityOfConformity: number;
  } | null;
  /** First date the 95 % prediction band reaches the tolerance (within 30 years), if any. */
  projectedExitDate: string | null;
  /** The 95 % prediction band of a new check sampled from the segment start to past the due
   * date (and the exit, when near), for charts; empty without a fit. */
  band: { date: string; predictedPpm: number; halfWidthPpm: number }[];
}

export type HistoryFlagCode =
  | 'step'
  | 'step-at-newest'
  | 'drift-exit'
  | 'drift'
  | 'alert-zone'
  | 'dip-below-minimum'
  | 'dip-fading'
  | 'q-falling'
  | 'spurious-response'
  | 'few-checks';

export interface HistoryFlag {
  code: HistoryFlagCode;
  /** stop: not to be used until resolved; warning: use with care, act soon; info: for the record. */
  severity: 'stop' | 'warning' | 'info';
  date: string | null;
  message: string;
  /** A few words for the register. */
  short: string;
}

export interface StepReport {
  date: string;
  isStep: boolean;
  flaggedFrequencies: number;
  testedFrequencies: number;
  tests: {
    frequencyHz: number;
    observedPpm: number;
    predictedPpm: number;
    limitPpm: number;
    basis: 'prediction';
    flagged: boolean;
  }[];
}

export interface IntervalAdvice {
  months: number;
  currentMonths: number;
  change: 'longer' | 'shorter' | 'same';
  method: IntervalMethod;
  methodName: string;
  boundedBy: 'minimum' | 'maximum' | null;
  rationale: string;
}

export interface TrendReport {
  assetId: string;
  state: MeterState;
  asOf: string;
  /** Time zero of the fits: the newest check's date (intercepts are errors fitted there). */
  epochDate: string | null;
  lastCheckDate: string | null;
  dueDate: string | null;
  segmentFromDate: string | null;
  frequencies: FrequencyTrend[];
  pooled: {
    driftPpmPerYear: number;
    uDriftPpmPerYear: number;
    dof: number;
    residualSdPpm: number;
    points: number;
    frequencies: number;
  } | null;
  steps: StepReport[];
  health: {
    minDipDb: number;
    dip: { date: string; minDb: number }[];
    dipSlopeDbPerYear: number | null;
    dipFallFraction: number | null;
    dipReachesMinimumDate: string | null;
  };
  flags: HistoryFlag[];
  projectedExitDate: string | null;
  suggestion: IntervalAdvice;
  /** Whether the lab prints suggested intervals on certificates (ISO/IEC 17025:2017 7.8.4.3). */
  printSuggestedInterval: boolean;
  notes: string[];
}

export interface FitForUseQuery {
  assetId?: string;
  /** With its unit: "9.3 GHz". */
  frequency: string | number;
}

export type UseReasonCode =
  | 'withdrawn'
  | 'quarantined'
  | 'outside-band'
  | 'never-checked'
  | 'overdue'
  | 'out-of-tolerance'
  | 'step'
  | 'expired-standard'
  | 'dip-below-minimum';

export interface UseAnswer {
  assetId: string;
  description: string;
  frequencyHz: number;
  fit: boolean;
  reasons: { code: UseReasonCode; message: string }[];
  /** Correction to add to a reading at the frequency, from the last check. */
  correction: {
    correctionHz: number;
    correctionPpm: number;
    uHz: number;
    uPpm: number;
    fromCheckDate: string;
    basis: string;
  } | null;
  /** Expanded uncertainty of a corrected reading there (k for about 95 %). */
  uncertainty: {
    combinedHz: number;
    expandedHz: number;
    expandedPpm: number;
    coverageFactor: number;
    lines: { label: string; uPpm: number }[];
  } | null;
  dueDate: string | null;
  daysToDue: number | null;
  warnings: string[];
}

export interface UseReport {
  frequencyHz: number;
  asOf: string;
  /** One answer with an asset id; otherwise every meter whose band covers the frequency, best first. */
  answers: UseAnswer[];
  notes: string[];
}

export interface CoverageSegment {
  fromHz: number;
  toHz: number;
  /** Meters whose band covers the whole segment. */
  meters: string[];
  /** Of those, in service, checked and not overdue. */
  usable: string[];
  gap: boolean;
  note: string;
}

export interface CoverageReport {
  fromHz: number;
  toHz: number;
  asOf: string;
  segments: CoverageSegment[];
  gaps: { fromHz: number; toHz: number; note: string }[];
}

export interface HistoryApi {
  /** Drift per check frequency, pooled drift, steps, health, flags and a suggested interval. */
  getTrend(assetId: string): Promise<TrendReport>;
  /** Fit for use today at a frequency, with the correction and uncertainty there. */
  fitForUse(query: FitForUseQuery): Promise<UseReport>;
  /** Which parts of about 1 GHz to 110 GHz the lab's meters cover, and the gaps. */
  coverage(): Promise<CoverageReport>;
}

export const HISTORY_OPERATIONS = {
  getTrend: 'read',
  fitForUse: 'read',
  coverage: 'read',
} as const satisfies Record<keyof HistoryApi, 'read' | 'write'>;
