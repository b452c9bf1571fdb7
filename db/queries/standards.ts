// Lab standards (traceable sources and counters) and their certificate history.
import type { StandardCertificate } from '../../app/model/records';
import type { LabDb } from '../store';
import { cachedStatement } from '../statements';

export interface StandardRecord {
  id: number;
  assetId: string;
  description: string;
  /** Newest first, each with its row id. */
  certificates: (StandardCertificate & { id: number })[];
}

interface StandardRow {
  id: number;
  asset_id: string;
  description: string;
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
}

const rowToCertificate = (r: CertificateRow): StandardCertificate & { id: number } => ({
  id: r.id,
  certificateId: r.certificate_id,
  issuedBy: r.issued_by,
  calibratedOn: r.calibrated_on,
  dueOn: r.due_on,
  expandedUncertaintyPpm: r.expanded_ppm,
  coverageFactor: r.coverage_k,
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
  const rows = db
    .prepare('SELECT id, asset_id, description FROM standard ORDER BY asset_id')
    .all() as StandardRow[];
  return rows.map((r) => ({
    id: r.id,
    assetId: r.asset_id,
    description: r.description,
    certificates: certificatesOf(db, r.id),
  }));
}

export function getStandardByAsset(db: LabDb, assetId: string): StandardRecord | undefined {
  const r = cachedStatement(db, 'SELECT id, asset_id, description FROM standard WHERE asset_id = ?').get(
    assetId,
  ) as StandardRow | undefined;
  return (
    r && { id: r.id, assetId: r.asset_id, description: r.description, certificates: certificatesOf(db, r.id) }
  );
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
