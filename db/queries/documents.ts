// Issued documents as rows: numbering, the lab's copy and digests, the signatures shown, and the
// chain of replacements (ISO/IEC 17025:2017 7.8.8). Row <-> model conversion is explicit here.
import type { DocumentKind } from '../../app/documents/model';
import type { LabDb } from '../store';

interface DocumentRow {
  id: number;
  kind: DocumentKind;
  number: string;
  revision: number;
  check_revision_id: number;
  check_id: number;
  check_revision: number;
  meter: string;
  issued_at: string;
  issued_by: string;
  replaces_id: number | null;
  replace_reason: string | null;
  replaced_by_id: number | null;
  sha256: string;
  record_sha256: string;
  record_name: string;
  byte_length: number;
  pades: number;
  interval_printed: number;
}

export interface IssuedDocumentRecord {
  id: number;
  kind: DocumentKind;
  number: string;
  revision: number;
  checkRevisionId: number;
  checkId: number;
  checkRevision: number;
  meterAssetId: string;
  issuedAt: string;
  issuedBy: string;
  replacesId: number | null;
  replaceReason: string | null;
  replacedById: number | null;
  sha256: string;
  recordSha256: string;
  recordName: string;
  byteLength: number;
  pades: boolean;
  intervalPrinted: boolean;
}

const rowToDocument = (r: DocumentRow): IssuedDocumentRecord => ({
  id: r.id,
  kind: r.kind,
  number: r.number,
  revision: r.revision,
  checkRevisionId: r.check_revision_id,
  checkId: r.check_id,
  checkRevision: r.check_revision,
  meterAssetId: r.meter,
  issuedAt: r.issued_at,
  issuedBy: r.issued_by,
  replacesId: r.replaces_id,
  replaceReason: r.replace_reason,
  replacedById: r.replaced_by_id,
  sha256: r.sha256,
  recordSha256: r.record_sha256,
  recordName: r.record_name,
  byteLength: r.byte_length,
  pades: r.pades === 1,
  intervalPrinted: r.interval_printed === 1,
});

const SELECT = `SELECT d.id, d.kind, d.number, d.revision, d.check_revision_id, cr.check_id, cr.revision AS check_revision,
    m.asset_id AS meter, d.issued_at, d.issued_by, d.replaces_id, d.replace_reason,
    (SELECT x.id FROM issued_document x WHERE x.replaces_id = d.id) AS replaced_by_id,
    d.sha256, d.record_sha256, d.record_name, d.byte_length, d.pades, d.interval_printed
  FROM issued_document d JOIN check_revision cr ON cr.id = d.check_revision_id
  JOIN check_event ce ON ce.id = cr.check_id JOIN meter m ON m.id = ce.meter_id`;

export interface NewIssuedDocument {
  kind: DocumentKind;
  number: string;
  revision: number;
  checkRevisionId: number;
  issuedAt: string;
  issuedBy: string;
  replacesId: number | null;
  replaceReason: string | null;
  sha256: string;
  recordSha256: string;
  recordName: string;
  pades: boolean;
  intervalPrinted: boolean;
  pdf: Buffer;
  signatureIds: number[];
}

/** Writes an issued document and the signatures it shows; call inside a transaction. */
export function insertIssuedDocument(db: LabDb, d: NewIssuedDocument): number {
  const info = db
    .prepare(
      `INSERT INTO issued_document (kind, number, revision, check_revision_id, issued_at, issued_by, replaces_id,
         replace_reason, sha256, record_sha256, record_name, byte_length, pades, interval_printed, pdf)
       VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
    )
    .run(
      d.kind,
      d.number,
      d.revision,
      d.checkRevisionId,
      d.issuedAt,
      d.issuedBy,
      d.replacesId,
      d.replaceReason,
      d.sha256,
      d.recordSha256,
      d.recordName,
      d.pdf.length,
      d.pades ? 1 : 0,
      d.intervalPrinted ? 1 : 0,
      d.pdf,
    );
  if (info.changes !== 1) throw new Error(`issued document: expected 1 row written, got ${info.changes}`);
  const id = Number(info.lastInsertRowid);
  const sig = db.prepare('INSERT INTO issued_document_signature (document_id, signature_id) VALUES (?, ?)');
  for (const s of d.signatureIds) {
    if (sig.run(id, s).changes !== 1) throw new Error(`issued document ${id}: signature ${s} not written`);
  }
  return id;
}

export function listIssuedDocuments(
  db: LabDb,
  filter: { meterAssetId?: string; checkId?: number } = {},
): IssuedDocumentRecord[] {
  const rows = db
    .prepare(
      `${SELECT} WHERE (? IS NULL OR m.asset_id = ?) AND (? IS NULL OR cr.check_id = ?)
       ORDER BY d.issued_at, d.id`,
    )
    .all(
      filter.meterAssetId ?? null,
      filter.meterAssetId ?? null,
      filter.checkId ?? null,
      filter.checkId ?? null,
    ) as DocumentRow[];
  return rows.map(rowToDocument);
}

export function findIssuedDocument(
  db: LabDb,
  number: string,
  revision: number,
): IssuedDocumentRecord | undefined {
  const r = db.prepare(`${SELECT} WHERE d.number = ? AND d.revision = ?`).get(number, revision) as
    DocumentRow | undefined;
  return r && rowToDocument(r);
}

export function findIssuedDocumentBySha256(db: LabDb, sha256: string): IssuedDocumentRecord | undefined {
  const r = db.prepare(`${SELECT} WHERE d.sha256 = ?`).get(sha256) as DocumentRow | undefined;
  return r && rowToDocument(r);
}

export function issuedDocumentById(db: LabDb, id: number): IssuedDocumentRecord | undefined {
  const r = db.prepare(`${SELECT} WHERE d.id = ?`).get(id) as DocumentRow | undefined;
  return r && rowToDocument(r);
}

/** The newest document of a kind for a check (any of its revisions), the one a replacement replaces. */
export function currentDocumentOfCheck(
  db: LabDb,
  kind: DocumentKind,
  checkId: number,
): IssuedDocumentRecord | undefined {
  const r = db
    .prepare(
      `${SELECT} WHERE d.kind = ? AND cr.check_id = ?
         AND NOT EXISTS (SELECT 1 FROM issued_document x WHERE x.replaces_id = d.id)
       ORDER BY d.id DESC LIMIT 1`,
    )
    .get(kind, checkId) as DocumentRow | undefined;
  return r && rowToDocument(r);
}

/** The next number of a kind for a year, e.g. C-2026-0007: one series per kind and year. */
export function nextDocumentNumber(db: LabDb, kind: DocumentKind, year: string): string {
  const prefix = `${kind === 'certificate' ? 'C' : 'S'}-${year}-`;
  const r = db
    .prepare(
      `SELECT max(CAST(substr(number, ?) AS INTEGER)) AS n FROM issued_document WHERE number LIKE ? AND revision = 1`,
    )
    .get(prefix.length + 1, `${prefix}%`) as { n: number | null };
  return `${prefix}${String((r.n ?? 0) + 1).padStart(4, '0')}`;
}

export function issuedPdf(db: LabDb, id: number): Buffer | undefined {
  const r = db.prepare('SELECT pdf FROM issued_document WHERE id = ?').get(id) as { pdf: Buffer } | undefined;
  return r?.pdf;
}

/** The signature values (base64) a document shows, by the signature rows it references. */
export function documentSignatureB64s(db: LabDb, documentId: number): string[] {
  return (
    db
      .prepare(
        `SELECT s.signature_b64 FROM issued_document_signature ds JOIN check_signature s ON s.id = ds.signature_id
         WHERE ds.document_id = ? ORDER BY s.seq`,
      )
      .all(documentId) as { signature_b64: string }[]
  ).map((r) => r.signature_b64);
}
