// Documents that leave the lab: certificates and check-sheets issued from signed checks (each
// with a number, a revision, its SHA-256 and the record it carries), the bench worksheet printed
// before a check, and the verification of a document someone received.
import type { DocumentKind } from '../documents/model';
import type { VerifyReport } from '../documents/verify';

export type { VerifyReport, VerifyFinding, FindingStatus } from '../documents/verify';
export type { DocumentKind } from '../documents/model';

export interface IssueDocumentInput {
  checkId: number;
  /** Required when the check already has a document of this kind: the new one replaces it
   * and says why (ISO/IEC 17025:2017 7.8.8). */
  replaceReason?: string;
  /** Optional embedded PDF signature with the lab's PKCS#12 certificate. */
  pdfSignature?: { p12Base64: string; passphrase: string };
}

export interface IssuedDocument {
  kind: DocumentKind;
  number: string;
  revision: number;
  meterAssetId: string;
  checkId: number;
  checkRevision: number;
  issuedAt: string;
  issuedBy: string;
  /** SHA-256 of the PDF as issued, and of the record attached to it (hex). */
  sha256: string;
  recordSha256: string;
  recordName: string;
  byteLength: number;
  /** Whether the file carries an embedded PDF signature. */
  pdfSigned: boolean;
  /** Whether a suggested interval was printed (only where the lab agreed; 7.8.4.3). */
  intervalPrinted: boolean;
  signatures: number;
  replaces: { number: string; revision: number; reason: string } | null;
  replacedBy: { number: string; revision: number } | null;
}

export interface IssuedDocumentFile extends IssuedDocument {
  pdfBase64: string;
}

export interface DocumentQuery {
  meter?: string;
  checkId?: number;
}

export interface WorksheetFile {
  assetId: string;
  printedOn: string;
  pdfBase64: string;
}

export interface VerifyDocumentInput {
  pdfBase64: string;
}

export interface DocumentsApi {
  /** Issues the certificate of the effective (newest signed) revision of a check. */
  issueCertificate(input: IssueDocumentInput): Promise<IssuedDocumentFile>;
  /** Issues the check-sheet of the effective revision of a check. */
  issueSheet(input: IssueDocumentInput): Promise<IssuedDocumentFile>;
  /** The bench worksheet of a meter, to print before a check (not an issued document). */
  worksheet(assetId: string): Promise<WorksheetFile>;
  listDocuments(query?: DocumentQuery): Promise<IssuedDocument[]>;
  /** Checks a document's bytes against itself and against what this lab recorded. */
  verifyDocument(input: VerifyDocumentInput): Promise<VerifyReport>;
  /** The certificate the lab signs documents with (made, and audited, if the lab has none yet):
   * what a recipient compares a document's PDF signature with. */
  documentCertificate(): Promise<DocumentCertificate>;
}

export interface DocumentCertificate {
  /** SHA-256 of the certificate (DER), hex. */
  fingerprint: string;
  subject: string;
  validFrom: string;
  validTo: string;
  certificatePem: string;
}

export const DOCUMENTS_OPERATIONS = {
  issueCertificate: 'write',
  issueSheet: 'write',
  worksheet: 'read',
  listDocuments: 'read',
  verifyDocument: 'read',
  documentCertificate: 'write',
} as const satisfies Record<keyof DocumentsApi, 'read' | 'write'>;
