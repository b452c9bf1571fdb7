// Migration 0008 (an index on what an audit entry is about): on a file with a trail it changes no
// entry, the chain still verifies, and a meter's trail is found through the index, not a scan.
import { describe, expect, it } from 'vitest';
import { createLabService } from '../../app/api/service';
import { migrate, openLabDb, schemaVersion } from '../../db/store';
import { clock, goodCheck, seed } from '../fixtures/lab';
import { withLaterColumns } from '../fixtures/later-columns';

describe('migration 0008_audit_index', () => {
  it('indexes the trail of a file at schema 7 without changing an entry', async () => {
    const db = openLabDb(':memory:', { targetVersion: 7 });
    withLaterColumns(db);
    const api = createLabService(db, { clock });
    await seed(api);
    await api.recordCheck(goodCheck());
    const before = db.prepare('SELECT * FROM audit_entry ORDER BY id').all();
    migrate(db, 8);
    expect(schemaVersion(db)).toBe(8);
    expect(db.prepare('SELECT * FROM audit_entry ORDER BY id').all()).toEqual(before);
    expect((await api.verifyIntegrity()).ok).toBe(true);
    const plan = db
      .prepare("EXPLAIN QUERY PLAN SELECT id FROM audit_entry WHERE entity = 'check' AND entity_id = '1'")
      .all() as { detail: string }[];
    expect(plan.map((p) => p.detail).join(' ')).toMatch(/USING (COVERING )?INDEX audit_entry_entity/);
    // The meter's trail through the API is the same list it was before the index.
    expect((await api.listAudit({ meter: 'TW-01' })).map((e) => e.action)).toEqual(['record', 'create']);
    db.close();
  });
});
