// The audit trail: append-only entries, each carrying the hash of the one before it and the
// digest of the entity it changed, so any edit or removal of an entry breaks the chain and any
// change of a row outside the program no longer matches its newest entry (ops/audit.ts checks).
import type { LabDb } from '../store';
import { appendAuditEntry, type AuditInput } from '../audit-hash';

export { auditHash, auditHeadOf, GENESIS_HASH, type AuditInput } from '../audit-hash';

export function appendAudit(db: LabDb, e: AuditInput): string {
  return appendAuditEntry(db, e);
}

export function auditCount(db: LabDb): number {
  return (db.prepare('SELECT count(*) AS n FROM audit_entry').get() as { n: number }).n;
}
