// The impact group: what a reference found off touched (ISO/IEC 17025:2017 7.10). A standard
// found off: every check made with it in a window, each point judged again with the deviation
// applied to its reference. A meter found off: its logged uses since its last passing check.
// And the log of uses itself.
import type { MeterState, Phase, Verdict } from '../engine/model';

export interface StandardImpactQuery {
  /** Asset id of the lab standard. */
  standard: string;
  /** Its as-found deviation, indicated minus true, with a unit: "0.3 ppm", "-40 Hz", "2 kHz". */
  error: string;
  /** Expanded uncertainty of the deviation (k = 2) with a unit; default: the standard's newest
   * certificate's U (relative), divided by its k. */
  uncertainty?: string;
  /** First day of the window (YYYY-MM-DD); default: the standard's newest certificate date. */
  since?: string;
}

export interface ImpactPointSide {
  errorHz: number;
  errorPpm: number;
  expandedHz: number;
  verdict: Verdict;
}

export interface ImpactPoint {
  seq: number;
  phase: Phase;
  referenceHz: number;
  /** Whether this point was made with the standard (only those are judged again). */
  usedStandard: boolean;
  before: ImpactPointSide;
  after: ImpactPointSide;
  verdictChanged: boolean;
}

export interface ImpactCheck {
  checkId: number;
  revision: number;
  assetId: string;
  date: string;
  asFoundBefore: Verdict | null;
  asFoundAfter: Verdict | null;
  asLeftBefore: Verdict | null;
  asLeftAfter: Verdict | null;
  verdictChanged: boolean;
  points: ImpactPoint[];
}

export interface ImpactMeter {
  assetId: string;
  state: MeterState;
  lastCheckDate: string | null;
  dueDate: string | null;
  /** The affected checks of this meter. */
  checkIds: number[];
  /** False when the newest check, judged again, no longer admits the meter into service. */
  stateHolds: boolean;
  /** False when the verdict the due date was set on changed. */
  dueDateHolds: boolean;
  reason: string;
}

export interface StandardImpact {
  standard: string;
  deviation: { unit: 'ppm' | 'Hz'; value: number; standardUncertainty: number };
  since: string;
  until: string;
  checks: ImpactCheck[];
  meters: ImpactMeter[];
  pointsJudged: number;
  pointsChanged: number;
  checksChanged: number;
}

export interface UseInput {
  /** Asset id of the meter used. */
  meter: string;
  /** The frequency it was used at, with a unit. */
  at: string;
  /** What for: the job, the customer's item, the purpose. */
  purpose: string;
  /** When (ISO date-time); default now. */
  usedAt?: string;
}

export interface UseRecord {
  id: number;
  assetId: string;
  usedAt: string;
  usedBy: string;
  frequencyHz: number;
  purpose: string;
}

export interface MeterImpactQuery {
  meter: string;
}

export interface MeterImpact {
  assetId: string;
  /** The newest check's as-found verdict (null when never checked). */
  asFoundVerdict: Verdict | null;
  /** Whether that verdict calls for the uses to be looked at (fail or conditional). */
  affected: boolean;
  /** Date of the last check passed as found before it, if any; uses are listed from then. */
  since: string | null;
  checkId: number | null;
  uses: UseRecord[];
}

export interface ImpactApi {
  /** What a standard's as-found deviation did to the checks made with it (read only). */
  standardImpact(query: StandardImpactQuery): Promise<StandardImpact>;
  /** A meter found off: its logged uses since its last passing check. */
  meterImpact(query: MeterImpactQuery): Promise<MeterImpact>;
  /** Logs one use of a meter (who from the signed-in person, when from the clock). Audited. */
  logUse(input: UseInput): Promise<UseRecord>;
}

export const IMPACT_OPERATIONS = {
  standardImpact: 'read',
  meterImpact: 'read',
  logUse: 'write',
} as const satisfies Record<keyof ImpactApi, 'read' | 'write'>;
