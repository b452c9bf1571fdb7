// The lab's document-signing certificates (migration 0010) as rows: the newest lab key signs,
// and every certificate ever used to sign is kept for `verify`.
import type { LabDb } from '../store';
import { cachedStatement } from '../statements';

interface DocumentKeyRow {
  id: number;
  origin: 'lab' | 'pkcs12';
  created_at: string;
  fingerprint: string;
  certificate_pem: string;
  private_key_pem: string | null;
}

export interface DocumentKeyRecord {
  id: number;
  origin: 'lab' | 'pkcs12';
  createdAt: string;
  fingerprint: string;
  certificatePem: string;
  /** Present for the lab's own keys only. */
  privateKeyPem: string | null;
}

function rowToKey(r: DocumentKeyRow): DocumentKeyRecord {
  return {
    id: r.id,
    origin: r.origin,
    createdAt: r.created_at,
    fingerprint: r.fingerprint,
    certificatePem: r.certificate_pem,
    privateKeyPem: r.private_key_pem,
  };
}

/** The lab key that signs now: the newest of origin 'lab'. */
export function currentLabDocumentKey(db: LabDb): DocumentKeyRecord | undefined {
  const r = cachedStatement(
    db,
    "SELECT * FROM document_key WHERE origin = 'lab' ORDER BY id DESC LIMIT 1",
  ).get() as DocumentKeyRow | undefined;
  return r && rowToKey(r);
}

export function documentKeyByFingerprint(db: LabDb, fingerprint: string): DocumentKeyRecord | undefined {
  const r = cachedStatement(db, 'SELECT * FROM document_key WHERE fingerprint = ?').get(fingerprint) as
    DocumentKeyRow | undefined;
  return r && rowToKey(r);
}

export function insertDocumentKey(db: LabDb, k: Omit<DocumentKeyRecord, 'id'>): number {
  const info = cachedStatement(
    db,
    `INSERT INTO document_key (origin, created_at, fingerprint, certificate_pem, private_key_pem)
     VALUES (?, ?, ?, ?, ?)`,
  ).run(k.origin, k.createdAt, k.fingerprint, k.certificatePem, k.privateKeyPem);
  if (info.changes !== 1) throw new Error('the document-signing certificate was not stored');
  return Number(info.lastInsertRowid);
}

/** Fingerprints of every certificate the lab has signed documents with. */
export function documentKeyFingerprints(db: LabDb): string[] {
  return (
    cachedStatement(db, 'SELECT fingerprint FROM document_key ORDER BY id').all() as { fingerprint: string }[]
  ).map((r) => r.fingerprint);
}
