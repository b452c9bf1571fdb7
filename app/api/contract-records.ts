// Records that hold up in an audit: people who sign and their keys, signatures of checks,
// amendments as new revisions, the audit trail, and the integrity check of a whole lab file.
import type { CheckRecord, Person } from './contract';

/** What a signature means, shown with it (21 CFR Part 11 section 11.50(a)(3)). */
export type SignatureMeaning = 'performed' | 'reviewed' | 'approved';

export interface EnrolSignerInput {
  /** An existing person without a key, or a new one (then `role` is needed). */
  name: string;
  role?: Person['role'];
  /** Seals the new private key; never stored, never shown, never written to the trail. */
  passphrase: string;
}

export interface Signer {
  person: Person;
  /** SHA-256 of the public key, hex. */
  keyFingerprint: string;
  enrolledAt: string;
}

export interface SignCheckInput {
  checkId: number;
  /** The signer's name (first component of the signature) ... */
  person: string;
  /** ... and passphrase (second component; 21 CFR 11.200(a)(1)). */
  passphrase: string;
  /** Defaults to the next one due: performed, then reviewed, then approved. */
  meaning?: SignatureMeaning;
}

export interface AmendCheckInput {
  checkId: number;
  /** Why the record changes; kept with the new revision and in the trail. */
  reason: string;
  /** The whole corrected check (dipledger.check/1), same meter. */
  document: unknown;
}

export interface RevisionQuery {
  checkId: number;
  /** A revision number; the effective revision when left out. */
  revision?: number;
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

/** One changed value between a revision and the one before it; `path` like "points[1].readings[0].value". */
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
  /** sqlite | audit | signature | key | lock */
  kind: 'sqlite' | 'audit' | 'signature' | 'key' | 'lock';
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
  /** Every problem, the first broken audit link first. */
  problems: IntegrityProblem[];
}

export interface RecordsApi {
  /** Gives a person an Ed25519 signing key sealed by their passphrase (creating the person if new). */
  enrolSigner(input: EnrolSignerInput): Promise<Signer>;
  listSigners(): Promise<Signer[]>;
  /** Signs the newest revision of a check; the first signature locks it. */
  signCheck(input: SignCheckInput): Promise<CheckRevisionView>;
  /** Makes a new revision of a check with a reason; earlier revisions stay as they were. */
  amendCheck(input: AmendCheckInput): Promise<CheckRevisionView>;
  getCheckRevision(query: RevisionQuery): Promise<CheckRevisionView>;
  listAudit(query: AuditQuery): Promise<AuditEntryView[]>;
  /** SQLite's integrity check, the audit chain and every signature. */
  verifyIntegrity(): Promise<IntegrityReport>;
}

export const RECORDS_OPERATIONS = {
  enrolSigner: 'write',
  listSigners: 'read',
  signCheck: 'write',
  amendCheck: 'write',
  getCheckRevision: 'read',
  listAudit: 'read',
  verifyIntegrity: 'read',
} as const satisfies Record<keyof RecordsApi, 'read' | 'write'>;
