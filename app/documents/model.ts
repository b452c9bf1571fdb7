// What a document is built from: plain data only (the lab, the meter, the check as recorded,
// the standards with their certificates, the signatures), so the documents depend on nothing
// but these shapes and render the same record the same way years later.
import type { CheckRecord, LabSettings, Meter, Standard, StandardCertificate } from '../model/records';

export type DocumentKind = 'certificate' | 'check-sheet';

export type SignatureMeaning = 'performed' | 'reviewed' | 'approved';

/** One signature on a check revision, as shown on documents and embedded in their record. */
export interface DocumentSignature {
  /** Order on the revision: each signature also covers the ones before it. */
  seq: number;
  meaning: SignatureMeaning;
  signer: string;
  role: string;
  signedAt: string;
  /** SHA-256 fingerprint of the signer's public key, and the key itself (PEM, SPKI). */
  keyFingerprint: string;
  publicKeyPem: string;
  /** SHA-256 (hex) of the exact bytes signed, and the Ed25519 signature (base64). */
  payloadSha256: string;
  signatureB64: string;
}

/** The identity of an issued document (ISO/IEC 17025:2017 7.8.2.1 d, j; 7.8.8). */
export interface IssueInfo {
  kind: DocumentKind;
  number: string;
  revision: number;
  issuedAt: string;
  issuedBy: string;
  /** The document this one replaces, and why (7.8.8.1, 7.8.8.3). */
  replaces: { number: string; revision: number; issuedAt: string; reason: string } | null;
  /** The hash of the newest audit entry when the document was issued (the lab file's trail
   * anchored outside it: `integrity` checks it is still in the chain). Absent on older documents. */
  auditHead?: string;
}

/** A standard used in the check with the certificate that was valid on the check date. */
export interface StandardUsed {
  assetId: string;
  description: string;
  /** Null when none was valid on the check date (an exception a permissive lab recorded). */
  certificate: StandardCertificate | null;
}

/** An interval suggestion, printed only where the lab has agreed to it (7.8.4.3). */
export interface IntervalSuggestion {
  months: number;
  method: string;
  reason: string;
}

export interface CheckDocumentData {
  lab: LabSettings;
  meter: Meter;
  check: CheckRecord;
  standards: StandardUsed[];
  signatures: DocumentSignature[];
  /** Exactly what the signatures cover (the revision's signed content, "dipledger.signature/1"). */
  signedContent: unknown;
  issue: IssueInfo;
  /** Present only when the lab prints suggested intervals and one could be made. */
  suggestedInterval: IntervalSuggestion | null;
}

export interface WorksheetData {
  lab: LabSettings;
  meter: Meter;
  /** Standards the lab holds, with their newest certificate, to pick from at the bench. */
  standards: Standard[];
  /** Date the worksheet was printed. */
  printedOn: string;
}

/** The certificate valid on a date, if any. */
export function certificateOn(s: Standard, date: string): StandardCertificate | undefined {
  return s.certificates.find((c) => c.calibratedOn <= date && date <= c.dueOn);
}

/** The standards of a check with the certificates valid on its date. */
export function standardsUsed(check: CheckRecord, standards: Standard[]): StandardUsed[] {
  const out: StandardUsed[] = [];
  for (const assetId of check.standards) {
    const s = standards.find((x) => x.assetId === assetId);
    if (s)
      out.push({ assetId, description: s.description, certificate: certificateOn(s, check.date) ?? null });
    else out.push({ assetId, description: '(not in this lab)', certificate: null });
  }
  return out;
}
