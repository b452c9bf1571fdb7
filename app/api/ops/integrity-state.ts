// The checks of `integrity` that compare the tables with what the program recorded: each entity's
// present content with the digest its newest audit entry committed to, the schema with the one
// the program makes, rows whose parent is gone, the stored summaries with a fresh computation, and
// the audit heads that issued documents carry with the chain.
import { allEntityDigests, isTrackedEntity } from '../../../db/entity-state';
import { schemaDifferences } from '../../../db/schema-check';
import { issuedPdfs } from '../../../db/queries/anchors';
import type { LabDb } from '../../../db/store';
import { readPdf } from '../../documents/pdfread';
import { decodeRecord } from '../../documents/record';
import type { IntegrityProblem } from '../contract-records';

/** The newest entry about one entity that carries a digest. */
export interface NewestState {
  entryId: number;
  at: string;
  action: string;
  stateSha256: string;
}

const ENTITY_WORDS: Record<string, string> = {
  lab: 'the lab settings',
  person: 'person',
  'person-key': 'signing key',
  meter: 'meter',
  standard: 'standard',
  check: 'check',
  document: 'issued document',
  draft: 'draft',
};

const named = (entity: string, id: string): string =>
  entity === 'lab' ? 'the lab settings' : `${ENTITY_WORDS[entity] ?? entity} ${id}`;

/** Rows changed, deleted or inserted outside the program, entity by entity. */
export function stateProblems(
  db: LabDb,
  newest: Map<string, NewestState>,
): { entities: number; problems: IntegrityProblem[] } {
  const problems: IntegrityProblem[] = [];
  // A file not yet migrated to entity digests (opened read-only, or a test at an older schema)
  // has nothing to compare with.
  if (!(db.pragma('table_info(audit_entry)') as { name: string }[]).some((c) => c.name === 'state_sha256'))
    return { entities: 0, problems };
  const { digests, orphans } = allEntityDigests(db);
  for (const [key, digest] of digests) {
    const [entity, id] = key.split('\u0000') as [string, string];
    const entry = newest.get(key);
    const name = named(entity, id);
    if (!entry)
      problems.push({
        kind: 'entity',
        record: name,
        problem: `${name} is in the lab file but no audit entry records it: it was inserted outside the program`,
        affects: `${name} and everything shown from it`,
      });
    else if (entry.stateSha256 !== digest)
      problems.push({
        kind: 'entity',
        record: name,
        problem: `${name} was changed outside the program: its rows no longer match audit entry ${entry.entryId} (${entry.action} at ${entry.at})`,
        affects: `${name} and everything shown from it`,
      });
  }
  for (const [key, entry] of newest) {
    if (digests.has(key) || entry.stateSha256 === '') continue;
    const [entity, id] = key.split('\u0000') as [string, string];
    if (!isTrackedEntity(entity)) continue;
    const name = named(entity, id);
    problems.push({
      kind: 'entity',
      record: name,
      problem: `${name} was deleted outside the program: audit entry ${entry.entryId} (${entry.action} at ${entry.at}) records it`,
      affects: `${name} and everything that refers to it`,
    });
  }
  for (const o of orphans)
    problems.push({
      kind: 'entity',
      record: `table ${o.table}`,
      problem: `${o.rows} row${o.rows === 1 ? '' : 's'} of ${o.table} belong${o.rows === 1 ? 's' : ''} to nothing in the lab file: inserted outside the program, or their parent was deleted`,
      affects: `the records those rows would belong to`,
    });
  const fk = db.pragma('foreign_key_check') as { table: string; rowid: number | null; parent: string }[];
  const byTable = new Map<string, number>();
  for (const r of fk)
    byTable.set(`${r.table} -> ${r.parent}`, (byTable.get(`${r.table} -> ${r.parent}`) ?? 0) + 1);
  for (const [pair, n] of byTable)
    problems.push({
      kind: 'entity',
      record: `table ${pair.split(' -> ')[0]}`,
      problem: `${n} row${n === 1 ? '' : 's'} of ${pair.replace(' -> ', ' refer to a missing row of ')}`,
      affects: 'the records those rows belong to',
    });
  return { entities: digests.size, problems };
}

export function schemaProblems(db: LabDb): IntegrityProblem[] {
  return schemaDifferences(db).map((d) => ({
    kind: 'schema' as const,
    record: 'the schema',
    problem: d,
    affects: d.startsWith('trigger')
      ? 'the guard that keeps records from being edited: check every record it protects'
      : 'the lab file as a whole',
  }));
}

/** The audit head each issued document carries, checked against the chain. */
export function anchorProblems(
  db: LabDb,
  chain: ReadonlySet<string>,
): { anchored: number; problems: IntegrityProblem[] } {
  const problems: IntegrityProblem[] = [];
  let anchored = 0;
  for (const d of issuedPdfs(db)) {
    const name = `issued document ${d.number} revision ${d.revision}`;
    let head: unknown;
    try {
      const file = readPdf(d.pdf).files.find((f) => f.name === d.recordName);
      const record = file ? decodeRecord(file.bytes) : undefined;
      head = (record as { document?: { auditHead?: unknown } } | undefined)?.document?.auditHead;
    } catch {
      head = undefined;
    }
    if (typeof head !== 'string') continue; // issued before documents carried the head
    anchored += 1;
    if (!chain.has(head))
      problems.push({
        kind: 'anchor',
        record: name,
        problem: `${name} carries audit head ${head}, which is no longer in the chain: audit entries were removed or rewritten`,
        affects: 'the audit trail from that entry on',
      });
  }
  return { anchored, problems };
}
