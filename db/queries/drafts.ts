// Drafts of checks being typed: one row per draft holding the in-progress exchange document as
// JSON. Explicit row <-> model conversion, every write checked for the rows it changed.
import type { LabDb } from '../store';

export interface DraftRecord {
  id: number;
  meterAssetId: string | null;
  document: Record<string, unknown>;
  createdAt: string;
  updatedAt: string;
}

interface DraftRow {
  id: number;
  meter_asset_id: string | null;
  document_json: string;
  created_at: string;
  updated_at: string;
}

function rowToDraft(r: DraftRow): DraftRecord {
  return {
    id: r.id,
    meterAssetId: r.meter_asset_id,
    document: JSON.parse(r.document_json) as Record<string, unknown>,
    createdAt: r.created_at,
    updatedAt: r.updated_at,
  };
}

function draftToRow(d: Omit<DraftRecord, 'id'>): Omit<DraftRow, 'id'> {
  return {
    meter_asset_id: d.meterAssetId,
    document_json: JSON.stringify(d.document),
    created_at: d.createdAt,
    updated_at: d.updatedAt,
  };
}

export function getDraft(db: LabDb, id: number): DraftRecord | undefined {
  const row = db.prepare('SELECT * FROM check_draft WHERE id = ?').get(id) as DraftRow | undefined;
  return row && rowToDraft(row);
}

/** Newest first: the draft a technician was just typing comes to the top. */
export function listDrafts(db: LabDb): DraftRecord[] {
  const rows = db.prepare('SELECT * FROM check_draft ORDER BY updated_at DESC, id DESC').all() as DraftRow[];
  return rows.map(rowToDraft);
}

export function insertDraft(db: LabDb, d: Omit<DraftRecord, 'id'>): number {
  const info = db
    .prepare(
      `INSERT INTO check_draft (meter_asset_id, document_json, created_at, updated_at)
       VALUES (@meter_asset_id, @document_json, @created_at, @updated_at)`,
    )
    .run(draftToRow(d));
  if (info.changes !== 1) throw new Error(`draft: expected 1 row inserted, got ${info.changes}`);
  return Number(info.lastInsertRowid);
}

/** Replaces a draft's document; false when no such draft exists. */
export function updateDraft(
  db: LabDb,
  id: number,
  d: Pick<DraftRecord, 'meterAssetId' | 'document' | 'updatedAt'>,
): boolean {
  const info = db
    .prepare(`UPDATE check_draft SET meter_asset_id = ?, document_json = ?, updated_at = ? WHERE id = ?`)
    .run(d.meterAssetId, JSON.stringify(d.document), d.updatedAt, id);
  if (info.changes > 1) throw new Error(`draft ${id}: expected at most 1 row updated, got ${info.changes}`);
  return info.changes === 1;
}

/** False when no such draft exists. */
export function deleteDraft(db: LabDb, id: number): boolean {
  const info = db.prepare('DELETE FROM check_draft WHERE id = ?').run(id);
  if (info.changes > 1) throw new Error(`draft ${id}: expected at most 1 row deleted, got ${info.changes}`);
  return info.changes === 1;
}
