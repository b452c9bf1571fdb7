// The audit trail: append-only entries, each carrying the hash of the one before it, so any
// edit or removal breaks the chain (verification comes with the records-integrity work).
import { createHash } from 'node:crypto';
import type { LabDb } from '../store';
import { cachedStatement } from '../statements';

export interface AuditInput {
  at: string;
  actor: string;
  action: string;
  entity: string;
  entityId: string;
  before: unknown;
  after: unknown;
}

export const GENESIS_HASH = '0'.repeat(64);

export function appendAudit(db: LabDb, e: AuditInput): string {
  const last = cachedStatement(db, 'SELECT hash FROM audit_entry ORDER BY id DESC LIMIT 1').get() as
    { hash: string } | undefined;
  const prevHash = last?.hash ?? GENESIS_HASH;
  const beforeJson = e.before === undefined ? null : JSON.stringify(e.before);
  const afterJson = e.after === undefined ? null : JSON.stringify(e.after);
  const hash = auditHash(prevHash, e.at, e.actor, e.action, e.entity, e.entityId, beforeJson, afterJson);
  cachedStatement(
    db,
    `INSERT INTO audit_entry (at, actor, action, entity, entity_id, before_json, after_json, prev_hash, hash)
     VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)`,
  ).run(e.at, e.actor, e.action, e.entity, e.entityId, beforeJson, afterJson, prevHash, hash);
  return hash;
}

/** The hash of one entry over the one before it; the integrity check recomputes it. */
export function auditHash(
  prevHash: string,
  at: string,
  actor: string,
  action: string,
  entity: string,
  entityId: string,
  beforeJson: string | null,
  afterJson: string | null,
): string {
  return createHash('sha256')
    .update(JSON.stringify([prevHash, at, actor, action, entity, entityId, beforeJson, afterJson]))
    .digest('hex');
}

export function auditCount(db: LabDb): number {
  return (db.prepare('SELECT count(*) AS n FROM audit_entry').get() as { n: number }).n;
}
