// Migration 0007 (summaries kept in the lab file): on a file with records it only adds derived
// data, the empty summary table and an index that meterHistory reads through (every other table
// keeps its rows, the integrity check still passes), and dropping the table later loses nothing
// the answers need.
import { describe, expect, it } from 'vitest';
import { createLabService } from '../../app/api/service';
import { forgetSummaries, setSummariesEnabled } from '../../app/api/history/summaries';
import { COMBINED_HZ_SQL, HISTORY_SQL } from '../../db/queries/history';
import { openLabDb, schemaVersion, type LabDb } from '../../db/store';
import { clock, goodCheck, seed } from '../fixtures/lab';
import { withLaterColumns } from '../fixtures/later-columns';
import { STORED_SUMMARIES_VERSION, migrateToStoredSummaries } from '../fixtures/summaries';

function rowCounts(db: LabDb): Record<string, number> {
  const tables = (
    db
      .prepare(
        "SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' ORDER BY name",
      )
      .all() as { name: string }[]
  ).map((t) => t.name);
  return Object.fromEntries(
    tables.map((t) => [t, (db.prepare(`SELECT count(*) AS n FROM "${t}"`).get() as { n: number }).n]),
  );
}

describe('migration 0007_stored_summaries', () => {
  it('adds an empty table of derived data and changes no record', async () => {
    const db = openLabDb(':memory:', { targetVersion: STORED_SUMMARIES_VERSION - 1 });
    withLaterColumns(db);
    const api = createLabService(db, { clock });
    await seed(api);
    await api.recordCheck(goodCheck());
    await api.recordCheck(goodCheck({ date: '2026-11-25' }));
    const before = rowCounts(db);
    const due = await api.listDue({ withinDays: 3650 });

    migrateToStoredSummaries(db);
    expect(schemaVersion(db)).toBe(STORED_SUMMARIES_VERSION);
    const after = rowCounts(db);
    // schema_migration gains the migration's own row; nothing else but the new table changes.
    expect(after).toEqual({
      ...before,
      schema_migration: (before.schema_migration ?? 0) + 1,
      meter_summary: 0,
    });
    expect((await api.verifyIntegrity()).ok).toBe(true);
    // A meter's history is read through the index of the numbers it needs (by the query of this
    // schema, which read combinedHz out of result_json; 0009 gave it a column).
    const historySql7 = HISTORY_SQL.replace(COMBINED_HZ_SQL, "cp.result_json -> '$.budget.combinedHz'");
    const plan = (db.prepare(`EXPLAIN QUERY PLAN ${historySql7}`).all(1) as { detail: string }[]).map(
      (r) => r.detail,
    );
    expect(plan).toContainEqual(expect.stringContaining('USING INDEX check_point_history'));

    // The answers (of a process starting on the migrated file) fill it, read the same, and do not
    // need it.
    forgetSummaries(db);
    expect(await api.listDue({ withinDays: 3650 })).toStrictEqual(due);
    expect(rowCounts(db).meter_summary).toBeGreaterThan(0);
    db.exec('DROP TABLE meter_summary');
    setSummariesEnabled(db, false);
    expect(await api.listDue({ withinDays: 3650 })).toStrictEqual(due);
    db.close();
  });
});
