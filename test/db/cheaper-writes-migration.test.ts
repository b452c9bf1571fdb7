// Migration 0009 (check_point.combined_hz and the history index on it, reading WITHOUT ROWID) on a
// file at schema 8 with signed, amended and draft checks: every row and every trigger is as it was
// (no point is rewritten), the readings of a signed revision still can be neither added, changed
// nor removed, the integrity check passes, and history reads the very numbers it read out of the
// stored results before, including those a REAL column cannot hold (NaN, -0 written as "-0").
// Points written after it get their cell and read back as decoding their whole stored result
// gives, for any double.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { LabApi } from '../../app/api/contract';
import { decodeStoredJson as decodeJson, encodeJson } from '../../db/codec/stored-json';
import { createLabService } from '../../app/api/service';
import { forgetSummaries, setSummariesEnabled } from '../../app/api/history/summaries';
import type { PointResult } from '../../app/engine/model';
import { insertCheck, type NewCheckRevision } from '../../db/queries/checks';
import { COMBINED_HZ_SQL, HISTORY_SQL, meterHistory, pointResults } from '../../db/queries/history';
import { combinedHzCell, combinedHzOfCell, type CombinedHzCell } from '../../db/queries/point-combined';
import { migrate, openLabDb, schemaVersion, type LabDb } from '../../db/store';
import { clock, goodCheck, seed } from '../fixtures/lab';
import { withLaterColumns, withoutLaterColumns } from '../fixtures/later-columns';

const ADA = { name: 'Ada Fenwick', passphrase: 'ada-passphrase-1' };
const BO = { name: 'Bo Marsh', passphrase: 'bo-passphrase-22' };

/** HISTORY_SQL as it was at schema 8: combinedHz read out of the stored result by SQLite. */
const HISTORY_SQL_8 = HISTORY_SQL.replace(COMBINED_HZ_SQL, "cp.result_json -> '$.budget.combinedHz'");

const names = (db: LabDb, type: string): string[] =>
  (
    db
      .prepare("SELECT name FROM sqlite_master WHERE type = ? AND name NOT LIKE 'sqlite_%' ORDER BY name")
      .all(type) as { name: string }[]
  ).map((r) => r.name);

const schemaRows = (db: LabDb) =>
  db.prepare('SELECT type, name, tbl_name, sql FROM sqlite_master ORDER BY type, name').all();
const triggers = (db: LabDb) =>
  db.prepare("SELECT name, tbl_name, sql FROM sqlite_master WHERE type = 'trigger' ORDER BY name").all();
const columnsOf = (db: LabDb, table: string): string[] =>
  (db.prepare(`PRAGMA table_info("${table}")`).all() as { name: string }[]).map((c) => c.name);

/** Every row of every table, in a fixed order, with the columns the table had at schema 8. */
function allRows(db: LabDb, columns: Record<string, string[]>): Record<string, unknown[]> {
  return Object.fromEntries(
    Object.entries(columns).map(([table, cols]) => {
      const list = cols.map((c) => `"${c}"`).join(', ');
      const order = cols.map((_, i) => i + 1).join(', ');
      return [table, db.prepare(`SELECT ${list} FROM "${table}" ORDER BY ${order}`).raw().all()];
    }),
  );
}

/** Each meter's history rows as HISTORY_SQL reads them, combinedHz decoded with `decode`. */
function historyRows(db: LabDb, sql: string, decode: (cell: CombinedHzCell) => number): unknown[][] {
  const read = db.prepare(sql).raw(true);
  const meters = db.prepare('SELECT id FROM meter ORDER BY id').pluck().all() as number[];
  return meters.flatMap((id) =>
    (read.all(id) as unknown[][]).map((r) => [id, ...r.slice(0, 14), decode(r[14] as CombinedHzCell)]),
  );
}
const decodeText = (cell: CombinedHzCell): number =>
  (cell === null ? undefined : decodeJson(cell as string)) as number;

/** What the history analysis answers: the register with its flags and each meter's trend. */
async function answers(api: LabApi): Promise<unknown> {
  const out: Record<string, unknown> = { due: await api.listDue({ withinDays: 3650 }) };
  for (const m of await api.listMeters()) out[m.assetId] = await api.getTrend(m.assetId);
  return out;
}

/** A file at schema 8 with checks recorded through the app (see fixtures/later-columns.ts). */
async function labAtSchema8(): Promise<{ db: LabDb; api: LabApi }> {
  const db = openLabDb(':memory:', { targetVersion: 8 });
  withLaterColumns(db);
  const api = createLabService(db, { clock });
  await seed(api);
  return { db, api };
}

describe('migration 0009_cheaper_writes', () => {
  it('keeps every row, trigger and answer of a file at schema 8 with signed and draft checks', async () => {
    const { db, api } = await labAtSchema8();
    await api.enrolSigner(ADA);
    await api.enrolSigner(BO);
    const sign = async (checkId: number) => {
      await api.signCheck({ checkId, person: ADA.name, passphrase: ADA.passphrase });
      await api.signCheck({ checkId, person: BO.name, passphrase: BO.passphrase });
    };
    const older = await api.recordCheck(goodCheck({ date: '2025-11-20' }));
    await sign(older.checkId);
    const amended = await api.recordCheck(goodCheck());
    await sign(amended.checkId);
    const corrected = goodCheck();
    corrected.points[0]!.readings[1] = { value: '10.002 GHz', direction: 'up' };
    await api.amendCheck({ checkId: amended.checkId, reason: 'transcription error', document: corrected });
    const draft = await api.recordCheck(
      goodCheck({
        meter: 'TW-02',
        points: [
          {
            reference: '3 GHz',
            readings: [
              { value: 9.0, direction: 'up' },
              { value: 9.02, direction: 'down' },
            ],
          },
        ],
      }),
    );
    setSummariesEnabled(db, false);
    const answersBefore = await answers(api);

    withoutLaterColumns(db);
    expect(schemaVersion(db)).toBe(8);
    const pristine = openLabDb(':memory:', { targetVersion: 8 });
    expect(schemaRows(db)).toEqual(schemaRows(pristine));
    pristine.close();
    const tables = names(db, 'table');
    const columns8 = Object.fromEntries(tables.map((t) => [t, columnsOf(db, t)]));
    const rowsBefore = allRows(db, columns8);
    const triggersBefore = triggers(db);
    const historyBefore = historyRows(db, HISTORY_SQL_8, decodeText);
    const signedPoint = db
      .prepare(
        `SELECT p.id FROM check_point p JOIN check_revision r ON r.id = p.revision_id
         WHERE r.state = 'signed' ORDER BY p.id LIMIT 1`,
      )
      .pluck()
      .get() as number;
    const draftPoint = db
      .prepare(
        `SELECT p.id FROM check_point p JOIN check_revision r ON r.id = p.revision_id
         WHERE r.check_id = ? ORDER BY p.id LIMIT 1`,
      )
      .pluck()
      .get(draft.checkId) as number;

    migrate(db, 9);
    expect(schemaVersion(db)).toBe(9);
    // The same rows (schema_migration gains this migration's; meter generations are not raised, so
    // summaries kept in the file stay valid), the same triggers, word for word.
    const { schema_migration: migrationsAfter, ...rowsAfter } = allRows(db, columns8);
    const { schema_migration: migrationsBefore, ...rowsKept } = rowsBefore;
    expect(rowsAfter).toEqual(rowsKept);
    expect(rowsKept.reading?.length).toBe(4 + 4 + 4 + 2);
    expect(migrationsAfter?.slice(0, 8)).toEqual(migrationsBefore);
    expect(migrationsAfter?.[8]).toEqual([9, 'cheaper_writes', expect.any(String)]);
    expect(names(db, 'table')).toEqual(tables);
    expect(triggers(db)).toEqual(triggersBefore);
    expect(columnsOf(db, 'check_point')).toEqual([...(columns8.check_point ?? []), 'combined_hz']);
    expect(db.prepare('SELECT count(*) FROM check_point WHERE combined_hz IS NOT NULL').pluck().get()).toBe(
      0,
    );
    expect(() => db.prepare('SELECT rowid FROM reading')).toThrow(/no such column/);

    // History reads what it read out of the stored results, and the app answers as it did.
    expect(historyRows(db, HISTORY_SQL, combinedHzOfCell)).toEqual(historyBefore);
    expect(historyBefore.length).toBeGreaterThanOrEqual(3);
    forgetSummaries(db);
    expect(await answers(api)).toEqual(answersBefore);
    const plan = (db.prepare(`EXPLAIN QUERY PLAN ${HISTORY_SQL}`).all(1) as { detail: string }[]).map(
      (r) => r.detail,
    );
    expect(plan).toContainEqual(expect.stringContaining('USING INDEX check_point_history'));
    // ...which holds the very expression history selects, so SQLite reads it from there.
    const indexSql = db
      .prepare("SELECT sql FROM sqlite_master WHERE name = 'check_point_history'")
      .pluck()
      .get();
    expect(indexSql).toContain(COMBINED_HZ_SQL.replaceAll('cp.', ''));

    // A signed revision's points and readings are still locked; a draft's are not.
    expect(() =>
      db
        .prepare("INSERT INTO reading (point_id, seq, value, direction) VALUES (?, 99, 1, 'up')")
        .run(signedPoint),
    ).toThrow(/never added to a signed revision/);
    expect(() => db.prepare('UPDATE reading SET value = 1 WHERE point_id = ?').run(signedPoint)).toThrow(
      /never changed/,
    );
    expect(() => db.prepare('DELETE FROM reading WHERE point_id = ?').run(signedPoint)).toThrow(
      /never deleted/,
    );
    expect(() => db.prepare('UPDATE check_point SET combined_hz = 1 WHERE id = ?').run(signedPoint)).toThrow(
      /never changed/,
    );
    expect(db.prepare('UPDATE reading SET value = value WHERE point_id = ?').run(draftPoint).changes).toBe(2);

    expect(db.pragma('integrity_check', { simple: true })).toBe('ok');
    expect(db.pragma('foreign_key_check')).toEqual([]);
    const integrity = await api.verifyIntegrity();
    expect(integrity.ok).toBe(true);
    db.close();
  });

  it('gives history the numbers of stored results that a REAL column could not hold', async () => {
    const { db, api } = await labAtSchema8();
    const gHz = [8.5, 9, 9.5, 10, 10.5, 11, 11.5, 12];
    const rec = await api.recordCheck(
      goodCheck({
        points: gHz.map((f) => ({
          reference: `${f} GHz`,
          readings: [
            { value: `${f} GHz`, direction: 'up' as const },
            { value: `${f} GHz`, direction: 'down' as const },
          ],
        })),
      }),
    );
    withoutLaterColumns(db);
    // The texts a stored result may hold for combinedHz (a draft's points may be rewritten), and
    // one point whose result has none.
    const texts = ['"NaN"', '"Infinity"', '"-Infinity"', '-0', '0', '5e-324', '1.7976931348623157e+308'];
    const ids = db
      .prepare(
        'SELECT p.id FROM check_point p JOIN check_revision r ON r.id = p.revision_id WHERE r.check_id = ? ORDER BY p.seq',
      )
      .pluck()
      .all(rec.checkId) as number[];
    const rewrite = db.prepare(
      "UPDATE check_point SET result_json = json_set(result_json, '$.budget.combinedHz', json(?)) WHERE id = ?",
    );
    texts.forEach((t, i) => rewrite.run(t, ids[i]));
    db.prepare(
      "UPDATE check_point SET result_json = json_remove(result_json, '$.budget.combinedHz') WHERE id = ?",
    ).run(ids[7]);
    const historyBefore = historyRows(db, HISTORY_SQL_8, decodeText);

    migrate(db, 9);
    const history = meterHistory(db, 1).flatMap((c) => c.points);
    expect(history.map((p) => p.combinedHz)).toEqual([
      NaN,
      Infinity,
      -Infinity,
      -0,
      0,
      5e-324,
      Number.MAX_VALUE,
      undefined,
    ]);
    expect(Object.is(history[3]?.combinedHz, -0)).toBe(true);
    expect(historyRows(db, HISTORY_SQL, combinedHzOfCell)).toEqual(historyBefore);
    db.close();
  });

  it('writes combinedHz so that history reads what decoding the whole stored result gives', async () => {
    const db = openLabDb(':memory:');
    const api = createLabService(db, { clock });
    await seed(api);
    const rec = await api.recordCheck(goodCheck());
    const lab = await api.getLab();
    const point = rec.points[0]!;
    const ids = db.prepare('SELECT id FROM person ORDER BY id').pluck().all() as number[];
    const revision = (result: PointResult): NewCheckRevision => ({
      meterId: 1,
      performerId: ids[0]!,
      date: '2026-11-21',
      method: 'tune-to-dip',
      conditions: rec.conditions,
      adjusted: false,
      remarks: '',
      decisionRule: lab.decisionRule,
      engineVersion: rec.engineVersion,
      asFoundVerdict: result.decision.verdict,
      asLeftVerdict: result.decision.verdict,
      worstUsedFraction: null,
      standards: [],
      points: [
        {
          phase: 'as-found',
          referenceHz: point.referenceHz,
          standardId: 1,
          dipDepthDb: null,
          readings: point.readings,
          result,
        },
      ],
    });
    const special = fc.constantFrom(NaN, -0, 0, Infinity, -Infinity, Number.MIN_VALUE, Number.MAX_VALUE);
    fc.assert(
      fc.property(fc.oneof(special, fc.double()), (combinedHz) => {
        const result = { ...point.result, budget: { ...point.result.budget, combinedHz } };
        const checkId = db.transaction(() => insertCheck(db, revision(result), clock.now()))();
        const stored = meterHistory(db, 1).find((c) => c.checkId === checkId)?.points[0];
        const whole = pointResults(db, [stored?.pointId ?? -1]).get(stored?.pointId ?? -1);
        expect(whole).toBeDefined();
        // The point has its cell (else history would read the stored result, as for older rows).
        const cell = db
          .prepare('SELECT combined_hz FROM check_point WHERE id = ?')
          .pluck()
          .get(stored?.pointId);
        expect(cell).toStrictEqual(combinedHzCell(combinedHz));
        expect(cell).not.toBeNull();
        expect(Object.is(stored?.combinedHz, whole?.budget.combinedHz)).toBe(true);
        // ...which is the value itself, but -0, which JSON writes as 0.
        expect(Object.is(stored?.combinedHz, decodeJson(encodeJson(combinedHz)))).toBe(true);
      }),
      { numRuns: 150 },
    );
    db.close();
  });
});
