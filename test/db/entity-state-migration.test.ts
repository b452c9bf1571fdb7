// Migration 0013_entity_state on a lab file written before audit entries carried entity digests:
// the entries already written keep their bytes and hashes, every entity present gets one audited
// "baseline" entry committing to its content as found, the file then passes `integrity`, and an
// edit made afterwards outside the program is named (the purpose of the digests).
import { describe, expect, it } from 'vitest';
import { createLabService } from '../../app/api/service';
import { BASELINE_ACTOR } from '../../db/baseline';
import { migrate, openLabDb, schemaVersion } from '../../db/store';
import { clock, goodCheck, seed } from '../fixtures/lab';

const ADA = { name: 'Ada Fenwick', passphrase: 'ada-passphrase-1' };

describe('migration 0013_entity_state', () => {
  it('baselines every entity of a schema-12 file once, keeps the older entries, and passes integrity', async () => {
    const db = openLabDb(':memory:', { targetVersion: 12 });
    const api = createLabService(db, { clock });
    await seed(api);
    await api.enrolSigner(ADA);
    const rec = await api.recordCheck(goodCheck());
    await api.signCheck({ checkId: rec.checkId, person: ADA.name, passphrase: ADA.passphrase });
    const before = db.prepare('SELECT * FROM audit_entry ORDER BY id').all();
    expect(before.length).toBeGreaterThan(5);

    migrate(db, 13);
    expect(schemaVersion(db)).toBe(13);
    const after = db.prepare('SELECT * FROM audit_entry ORDER BY id').all() as Record<string, unknown>[];
    // The older entries are the same rows, with no digest.
    expect(after.slice(0, before.length)).toEqual(
      (before as Record<string, unknown>[]).map((r) => ({ ...r, state_sha256: null })),
    );
    // One baseline per entity: the lab, 2 people, 1 key, 2 meters, 1 standard, 1 check.
    const baseline = after.slice(before.length);
    expect(baseline.map((e) => `${String(e.entity)} ${String(e.entity_id)}`).sort()).toEqual(
      [
        'check 1',
        'lab 1',
        'meter TW-01',
        'meter TW-02',
        'person 1',
        'person 2',
        'person-key 1',
        'standard SRC-A',
      ].sort(),
    );
    for (const e of baseline) {
      expect(e.actor).toBe(BASELINE_ACTOR);
      expect(e.action).toBe('baseline');
      expect(String(e.state_sha256)).toMatch(/^[0-9a-f]{64}$/);
    }
    const report = await api.verifyIntegrity();
    expect(report.problems).toEqual([]);
    expect(report.entitiesChecked).toBe(8);

    // From now on an edit outside the program is named.
    db.exec('DROP TRIGGER check_point_locked_update');
    db.exec("UPDATE check_point SET verdict = 'fail'");
    const tampered = await api.verifyIntegrity();
    expect(tampered.problems.map((p) => p.problem).join('\n')).toMatch(
      /check 1 was changed outside the program/,
    );
    expect(tampered.problems.map((p) => p.problem).join('\n')).toMatch(
      /trigger check_point_locked_update is missing/,
    );
    db.close();
  });

  it('writes no baseline into a new lab file', () => {
    const db = openLabDb(':memory:', { create: true });
    expect(db.prepare('SELECT count(*) FROM audit_entry').pluck().get()).toBe(0);
    db.close();
  });
});
