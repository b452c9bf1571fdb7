// Records that hold up in an audit: people who sign and their keys, signatures of checks,
// amendments as new revisions, the audit trail, and the integrity check of a whole lab file.
import type { Person } from '../model/records';
import type {
  SignatureMeaning,
  Signer,
  CheckRevisionView,
  AuditQuery,
  AuditEntryView,
  IntegrityReport,
} from '../model/revisions';

export type {
  SignatureMeaning,
  Signer,
  CheckSignature,
  RevisionChange,
  StandardUsed,
  RevisionSummary,
  CheckRevisionView,
  AuditQuery,
  AuditEntryView,
  IntegrityProblem,
  IntegrityReport,
} from '../model/revisions';

export interface EnrolSignerInput {
  /** An existing person without a key, or a new one (then `role` is needed). */
  name: string;
  role?: Person['role'];
  /** Seals the new private key; never stored, never shown, never written to the trail. */
  passphrase: string;
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

/** One changed value between a revision and the one before it; `path` like "points[1].readings[0].value". */

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
