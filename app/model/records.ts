// The lab's vocabulary: the records and views every layer speaks (the service, the store, the
// documents, the shells). Types only; nothing here computes.
import type {
  Conditions,
  Construction,
  DecisionRule,
  DialKind,
  MeterState,
  Phase,
  PointResult,
  Reading,
  ReferenceConditions,
  Verdict,
  ChartPoint,
} from '../engine/model';

export interface LabSettings {
  name: string;
  address: string;
  accreditation: string;
  decisionRule: DecisionRule;
  /** Target end-of-period reliability for interval analysis (e.g. 0.95). */
  reliabilityTarget: number;
  intervalMinMonths: number;
  intervalMaxMonths: number;
  /** Default standard uncertainties of bench conditions when a check does not give them. */
  defaultTemperatureUncertaintyC: number;
  defaultPressureUncertaintyHpa: number;
  defaultHumidityUncertaintyPct: number;
  /** Whether a suggested interval may appear on certificates (ISO/IEC 17025:2017 7.8.4.3). */
  printSuggestedInterval: boolean;
  /** Whether a check's reviewer must be someone other than its performer. */
  signersMustDiffer: boolean;
  /** strict: a standard out of calibration on the check date refuses the check; permissive:
   * the check is recorded with a visible exception on its revision. */
  traceabilityPolicy: 'strict' | 'permissive';
}

export interface Meter {
  assetId: string;
  description: string;
  construction: Construction;
  /** Connector (coaxial) or waveguide size designation, in the lab's own words. */
  port: string;
  minHz: number;
  maxHz: number;
  dialKind: DialKind;
  accuracyRelPpm: number;
  accuracyAbsHz: number;
  resolution: number;
  chart: ChartPoint[];
  alphaPerK: number;
  alphaUncertaintyPerK: number;
  reference: ReferenceConditions;
  loadedQ: number;
  settingFraction: number;
  minDipDb: number;
  maxInputPowerW: number;
  location: string;
  state: MeterState;
  intervalMonths: number;
  /** Frequencies checked at each periodic check. */
  planHz: number[];
}

export interface RegisterRow {
  assetId: string;
  description: string;
  construction: Construction;
  minHz: number;
  maxHz: number;
  state: MeterState;
  intervalMonths: number;
  lastCheckDate: string | null;
  /** Worst as-left verdict of the effective revision of the newest check, null if never checked. */
  lastVerdict: Verdict | null;
  dueDate: string | null;
  /** Days until due (negative when overdue), from the service clock. */
  daysToDue: number | null;
  /** History flags worth attention (drift, steps, dip health), in a few words each; filled by the
   * due list (see ops-history.ts). */
  flags?: string[];
}

export interface StandardCertificate {
  certificateId: string;
  issuedBy: string;
  calibratedOn: string;
  dueOn: string;
  expandedUncertaintyPpm: number;
  coverageFactor: number;
  /** The deviation found before any adjustment, relative, ppm, where the certificate reports one. */
  asFoundPpm?: number;
}

/** What a lab standard is: a signal source, a frequency counter, or something else. */
export type StandardKind = 'source' | 'counter' | 'other';

export interface Standard {
  assetId: string;
  description: string;
  /** Left out by older clients and fakes: then a source with no range given, in use. */
  kind?: StandardKind;
  /** Its frequency range, Hz, where given. */
  minHz?: number | null;
  maxHz?: number | null;
  /** The day it was retired (no check after it may name it), and why; null while in use. */
  retiredOn?: string | null;
  retiredReason?: string | null;
  /** Newest first. */
  certificates: StandardCertificate[];
  /** The newest certificate's due date, and days to it from the service clock. */
  dueOn: string;
  daysToDue: number;
}

export interface Person {
  id: number;
  name: string;
  role: 'technician' | 'reviewer' | 'administrator';
  /** The day the person left the lab: their signatures stand, they sign no more. */
  leftOn?: string;
}

export interface CheckPointRecord {
  seq: number;
  phase: Phase;
  referenceHz: number;
  standardAssetId: string;
  readings: Reading[];
  dipDepthDb: number | null;
  result: PointResult;
}

export type CheckState = 'draft' | 'signed' | 'amended';

export interface CheckRecord {
  checkId: number;
  revision: number;
  state: CheckState;
  meterAssetId: string;
  date: string;
  performer: string;
  standards: string[];
  method: 'tune-to-dip' | 'sweep';
  conditions: Conditions;
  adjusted: boolean;
  remarks: string;
  engineVersion: string;
  points: CheckPointRecord[];
  asFoundVerdict: Verdict | null;
  asLeftVerdict: Verdict | null;
  recordedAt: string;
}

export interface CheckSummary {
  checkId: number;
  revision: number;
  state: CheckState;
  date: string;
  performer: string;
  asFoundVerdict: Verdict | null;
  asLeftVerdict: Verdict | null;
  pointCount: number;
  /** Largest |error| / tolerance over the as-left points, as a fraction (1 = at the limit). */
  worstUsedFraction: number | null;
}

export interface MeterDetail {
  meter: Meter;
  register: RegisterRow;
  checks: CheckSummary[];
  /** Revisions of the specification after the first, oldest first. */
  revisions?: MeterRevision[];
}

/** One edit of a meter's specification: the values before and after, why, and from when they
 * apply. Results stored before it keep the inputs they were computed with. */
export interface MeterRevision {
  /** 2 for the first edit (revision 1 is the meter as added). */
  revision: number;
  /** The day from which due dates and verdicts follow the new values. */
  effectiveFrom: string;
  reason: string;
  actor: string;
  recordedAt: string;
  before: Meter;
  after: Meter;
}

export interface AirResult {
  refractivityN: number;
  refractiveIndex: number;
  waterVapourHpa: number;
  /** Shift of a cavity's resonance against the lab's reference air, ppm (negative = lower). */
  shiftPpm: number;
  referenceN: number;
}
