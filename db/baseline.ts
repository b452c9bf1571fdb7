// The one-time baseline of migration 0013: a lab file written before entries carried entity
// digests gets one audited "baseline" entry per entity present, committing to its content as the
// migration found it, so `integrity` has a digest to compare every entity with from then on.
// What was changed outside the program before the baseline cannot be told from it; the
// signatures, the chain and the keys are still checked as before.
import type Database from 'better-sqlite3';
import { appendAuditEntry } from './audit-hash';
import { allEntityDigests } from './entity-state';

export const BASELINE_ACTOR = 'dipledger (migration 0013)';

export function writeBaseline(db: Database.Database, at: string): number {
  const { digests } = allEntityDigests(db);
  const keys = [...digests.keys()].sort();
  for (const key of keys) {
    const [entity, entityId] = key.split('\u0000') as [string, string];
    appendAuditEntry(db, {
      at,
      actor: BASELINE_ACTOR,
      action: 'baseline',
      entity,
      entityId,
      before: undefined,
      after: { note: 'content as found when the lab file gained entity digests' },
    });
  }
  return keys.length;
}
