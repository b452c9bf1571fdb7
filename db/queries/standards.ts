// Lab standards (traceable sources and counters) and their certificate history.
import type { StandardCertificate, StandardKind } from '../../app/model/records';
import type { LabDb } from '../store';
import { cachedStatement } from '../statements';

export interface StandardRecord {
  id: number;
  assetId: string;
  description: string;
  kind: StandardKind;
  minHz: number | null;
  maxHz: number | null;
  retiredOn: string | null;
  retiredReason: string | null;
  /** Newest first, each with its row id. */
  certificates: (StandardCertificate & { id: number })[];
}

interface StandardRow {
  id: number;
  asset_id: string;
  description: string;
  // From 0011 (absent in a file at an older schema).
  kind?: StandardKind;
  min_hz?: number | null;
  max_hz?: number | null;
  retired_on?: string | null;
  retired_reason?: string | null;
}

interface CertificateRow {
  id: number;
  standard_id: number;
  certificate_id: string;
  issued_by: string;
  calibrated_on: string;
  due_on: string;
  expanded_ppm: number;
  coverage_k: number;
  as_found_ppm?: number | null;
}

const rowToCertificate = (r: CertificateRow): StandardCertificate & { id: number } => ({
  id: r.id,
  certificateId: r.certificate_id,
  issuedBy: r.issued_by,
  calibratedOn: r.calibrated_on,
  dueOn: r.due_on,
  expandedUncertaintyPpm: r.expanded_ppm,
  coverageFactor: r.coverage_k,
  ...(r.as_found_ppm === null || r.as_found_ppm === undefined ? {} : { asFoundPpm: r.as_found_ppm }),
});

function certificatesOf(db: LabDb, standardId: number): (StandardCertificate & { id: number })[] {
  return (
    cachedStatement(
      db,
      'SELECT * FROM standard_certificate WHERE standard_id = ? ORDER BY calibrated_on DESC, id DESC',
    ).all(standardId) as CertificateRow[]
  ).map(rowToCertificate);
}

export function listStandards(db: LabDb): StandardRecord[] {
  const rows = db.prepare('SELECT * FROM standard ORDER BY asset_id').all() as StandardRow[];
  return rows.map((r) => rowToStandard(db, r));
}

function rowToStandard(db: LabDb, r: StandardRow): StandardRecord {
  return {
    id: r.id,
    assetId: r.asset_id,
    description: r.description,
    kind: r.kind ?? 'source',
    minHz: r.min_hz ?? null,
    maxHz: r.max_hz ?? null,
    retiredOn: r.retired_on ?? null,
    retiredReason: r.retired_reason ?? null,
    certificates: certificatesOf(db, r.id),
  };
}

export function getStandardByAsset(db: LabDb, assetId: string): StandardRecord | undefined {
  const r = cachedStatement(db, 'SELECT * FROM standard WHERE asset_id = ?').get(assetId) as
    StandardRow | undefined;
  return r && rowToStandard(db, r);
}

export function insertStandard(
  db: LabDb,
  s: { assetId: string; description: string; certificates: StandardCertificate[] },
  createdAt: string,
): number {
  const info = db
    .prepare('INSERT INTO standard (asset_id, description, created_at) VALUES (?, ?, ?)')
    .run(s.assetId, s.description, createdAt);
  const id = Number(info.lastInsertRowid);
  const ins = db.prepare(
    `INSERT INTO standard_certificate (standard_id, certificate_id, issued_by, calibrated_on, due_on, expanded_ppm, coverage_k)
     VALUES (?, ?, ?, ?, ?, ?, ?)`,
  );
  for (const c of s.certificates) {
    ins.run(
      id,
      c.certificateId,
      c.issuedBy,
      c.calibratedOn,
      c.dueOn,
      c.expandedUncertaintyPpm,
      c.coverageFactor,
    );
  }
  return id;
}
