// Signed revisions and the audit trail in the lab's vocabulary: signatures, revisions, the
// standards a check used, audit entries and the integrity report.
import type { CheckRecord, Person } from './records';

/** What a signature means, shown with it (21 CFR Part 11 section 11.50(a)(3)). */
export type SignatureMeaning = 'performed' | 'reviewed' | 'approved';

export interface Signer {
  person: Person;
  /** SHA-256 of the public key, hex. */
  keyFingerprint: string;
  enrolledAt: string;
}

export interface CheckSignature {
  seq: number;
  printedName: string;
  role: Person['role'];
  meaning: SignatureMeaning;
  signedAt: string;
  keyFingerprint: string;
  /** SHA-256 of the RFC 8785 bytes the signature covers. */
  payloadSha256: string;
}

export interface RevisionChange {
  path: string;
  before: unknown;
  after: unknown;
}

export interface StandardUsed {
  assetId: string;
  certificateId: string;
  issuedBy: string;
  calibratedOn: string;
  dueOn: string;
  /** Whether that certificate covered the check date (traceability, ISO/IEC 17025:2017 6.5). */
  validOnCheckDate: boolean;
}

export interface RevisionSummary {
  revision: number;
  state: CheckRecord['state'];
  recordedAt: string;
  amendReason: string | null;
  amendedBy: string | null;
  signatures: number;
}

export interface CheckRevisionView {
  record: CheckRecord;
  /** The newest signed revision, null while no revision is signed. */
  effectiveRevision: number | null;
  revisions: RevisionSummary[];
  /** Why, by whom and when this revision was made, for revisions after the first. */
  amendment: { reason: string; by: string; at: string } | null;
  signatures: CheckSignature[];
  /** The signature this revision waits for (performed, then reviewed); null once reviewed or
   * when a newer revision exists. An approval may still follow a review. */
  awaiting: SignatureMeaning | null;
  standardsUsed: StandardUsed[];
  /** Standards used outside their calibration under a permissive lab policy. */
  traceabilityExceptions: string[];
  /** What changed from the revision before (empty for the first). */
  changes: RevisionChange[];
}

export interface AuditQuery {
  entity?: string;
  entityId?: string;
  /** A meter's asset id: its own entries and those of its checks and issued documents. */
  meter?: string;
  /** Newest first, at most this many (default 100, at most 10000). */
  limit?: number;
}

export interface AuditEntryView {
  id: number;
  at: string;
  actor: string;
  action: string;
  entity: string;
  entityId: string;
  before: unknown;
  after: unknown;
  hash: string;
}

export interface IntegrityProblem {
  /** sqlite | audit | signature | key | lock | entity (rows changed outside the program) |
   * schema | anchor (an issued document's audit head missing from the chain) | summary */
  kind: 'sqlite' | 'audit' | 'signature' | 'key' | 'lock' | 'entity' | 'schema' | 'anchor' | 'summary';
  /** The record it names, e.g. "check 12 revision 2" or "audit entry 40". */
  record: string;
  problem: string;
  /** What can no longer be trusted because of it. */
  affects: string;
}

export interface IntegrityReport {
  ok: boolean;
  sqlite: string[];
  auditEntries: number;
  /** Hash of the newest audit entry: note it outside the file to detect a rewritten chain. */
  auditHead: string;
  signaturesChecked: number;
  /** Entities whose content was compared with their newest audit entry. */
  entitiesChecked?: number;
  /** Issued documents that carry an audit head, each checked against the chain. */
  anchorsChecked?: number;
  /** Every problem, the first broken audit link first. */
  problems: IntegrityProblem[];
}
