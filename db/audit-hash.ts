// The hash of one audit entry over the one before it (the chain), and the writing of an entry.
// An entry written since the lab file gained entity digests (migration 0010) also commits to the
// digest of the entity it is about, as it stood after the change (db/entity-state.ts); older
// entries keep the hash they were written with.
import { createHash } from 'node:crypto';
import type Database from 'better-sqlite3';
import { entityDigest } from './entity-state';
import { cachedStatement } from './statements';

export const GENESIS_HASH = '0'.repeat(64);

export interface AuditInput {
  at: string;
  actor: string;
  action: string;
  entity: string;
  entityId: string;
  before: unknown;
  after: unknown;
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
  stateSha256: string | null = null,
): string {
  const fields = [prevHash, at, actor, action, entity, entityId, beforeJson, afterJson];
  return createHash('sha256')
    .update(JSON.stringify(stateSha256 === null ? fields : [...fields, stateSha256]))
    .digest('hex');
}

const hasStateColumn = new WeakMap<Database.Database, boolean>();

/** Whether the file's trail has the state_sha256 column (0010); tests that write through today's
 * code into a file at an older schema have none. */
function stateColumn(db: Database.Database): boolean {
  let has = hasStateColumn.get(db);
  if (has === undefined) {
    has = (db.pragma('table_info(audit_entry)') as { name: string }[]).some((c) => c.name === 'state_sha256');
    if (has) hasStateColumn.set(db, has);
  }
  return has;
}

/** Appends an entry after the newest one; call after the change it records, in its transaction. */
export function appendAuditEntry(db: Database.Database, e: AuditInput): string {
  const last = cachedStatement(db, 'SELECT hash FROM audit_entry ORDER BY id DESC LIMIT 1').get() as
    { hash: string } | undefined;
  const prevHash = last?.hash ?? GENESIS_HASH;
  const beforeJson = e.before === undefined ? null : JSON.stringify(e.before);
  const afterJson = e.after === undefined ? null : JSON.stringify(e.after);
  if (!stateColumn(db)) {
    const hash = auditHash(prevHash, e.at, e.actor, e.action, e.entity, e.entityId, beforeJson, afterJson);
    cachedStatement(
      db,
      `INSERT INTO audit_entry (at, actor, action, entity, entity_id, before_json, after_json, prev_hash, hash)
       VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)`,
    ).run(e.at, e.actor, e.action, e.entity, e.entityId, beforeJson, afterJson, prevHash, hash);
    return hash;
  }
  // An entity deleted by the change (or one no digest covers) has no state: the empty string.
  const state = entityDigest(db, e.entity, e.entityId) ?? '';
  const hash = auditHash(
    prevHash,
    e.at,
    e.actor,
    e.action,
    e.entity,
    e.entityId,
    beforeJson,
    afterJson,
    state,
  );
  cachedStatement(
    db,
    `INSERT INTO audit_entry (at, actor, action, entity, entity_id, before_json, after_json, prev_hash, hash,
       state_sha256) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
  ).run(e.at, e.actor, e.action, e.entity, e.entityId, beforeJson, afterJson, prevHash, hash, state);
  return hash;
}

/** The hash of the newest entry (the head of the chain), GENESIS_HASH for an empty trail. */
export function auditHeadOf(db: Database.Database): string {
  const last = cachedStatement(db, 'SELECT hash FROM audit_entry ORDER BY id DESC LIMIT 1').get() as
    { hash: string } | undefined;
  return last?.hash ?? GENESIS_HASH;
}
