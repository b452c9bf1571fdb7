// Summaries kept in the lab file (migration 0007, app/api/history/summaries.ts): a new process reads them
// instead of recomputing every meter, and gets the answers a fresh computation gives; a write by
// another process makes exactly that meter's summary stale; summaries made by another version,
// or a dropped table, only cost a recomputation; and a read-only file or one whose write lock is
// held elsewhere still answers, writes nothing, and keeps its busy timeout. What the summaries of
// the demo lab hold is pinned to SUMMARY_FORMAT, so a change to the analysis behind them cannot
// ship without raising it (stored summaries of the older format are then recomputed).
import { BUSY_ATTEMPT_MS } from '../../app/api/busy';
import Database from 'better-sqlite3';
import { createHash } from 'node:crypto';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { LabApi } from '../../app/api/contract';
import { createLabService } from '../../app/api/service';
import {
  forgetSummaries,
  setSummariesEnabled,
  SUMMARIES_MADE_BY,
  SUMMARY_FORMAT,
  summariesComputed,
} from '../../app/api/history/summaries';
import { openLabDb, type LabDb } from '../../db/store';
import { loadBundle, readSampleBundle, type SampleBundle } from '../../sample-lab/load';
import { clock } from '../fixtures/lab';
import { migrateToStoredSummaries } from '../fixtures/summaries';

let file: string;
let db: LabDb;
let api: LabApi;
let bundle: SampleBundle;
const extra: Database.Database[] = [];

beforeAll(async () => {
  file = path.join(mkdtempSync(path.join(tmpdir(), 'dipledger-summaries-')), 'lab.dipledger');
  db = openLabDb(file, { create: true });
  migrateToStoredSummaries(db);
  api = createLabService(db, { clock });
  bundle = readSampleBundle();
  await loadBundle(api, bundle);
}, 120_000);

afterAll(() => {
  for (const h of extra) h.close();
  db.close();
});

/** Another connection to the lab file, as another process has (opened directly: the file may be
 * at a schema this build's list of migrations does not reach yet). */
function another(options: { readonly?: boolean } = {}): { db: LabDb; api: LabApi } {
  const h = new Database(file, { readonly: options.readonly ?? false });
  h.pragma('busy_timeout = 5000');
  extra.push(h);
  return { db: h as LabDb, api: createLabService(h as LabDb, { clock }) };
}

/** The answers the stored summaries feed: the register with flags and every meter's trend. */
async function answers(on: LabApi): Promise<Record<string, unknown>> {
  const out: Record<string, unknown> = { due: await on.listDue({ withinDays: 3650 }) };
  for (const r of await on.listMeters()) out[`trend ${r.assetId}`] = await on.getTrend(r.assetId);
  return out;
}

async function fresh(on: { db: LabDb; api: LabApi }): Promise<Record<string, unknown>> {
  setSummariesEnabled(on.db, false);
  try {
    return await answers(on.api);
  } finally {
    setSummariesEnabled(on.db, true);
  }
}

const storedRows = (h: Database.Database) =>
  (h.prepare('SELECT count(*) AS n FROM meter_summary').get() as { n: number }).n;

const dayAfter = (iso: string) =>
  new Date(Date.parse(`${iso}T00:00:00Z`) + 86_400_000).toISOString().slice(0, 10);

describe('summaries kept in the lab file', () => {
  it('are read by a new process, which recomputes nothing and answers as fresh computation', async () => {
    const expected = await fresh({ db, api });
    expect(await answers(api)).toStrictEqual(expected);
    const first = summariesComputed(db);
    expect(first.stored).toBeGreaterThan(0);
    const meters = bundle.meters.length;
    expect(storedRows(db)).toBeGreaterThanOrEqual(meters);

    const next = another();
    expect(await answers(next.api)).toStrictEqual(expected);
    const counts = summariesComputed(next.db);
    expect(counts.flags).toBe(0);
    expect(counts.attributes).toBe(0);
    expect(counts.loaded).toBeGreaterThan(0);
    expect(counts.stored).toBe(0);
  }, 120_000);

  it('of the demo lab are pinned to their format number', () => {
    const rows = db
      .prepare(
        `SELECT m.asset_id, s.kind, s.summary_json FROM meter_summary s JOIN meter m ON m.id = s.meter_id
         ORDER BY m.asset_id, s.kind`,
      )
      .all();
    const sha256 = createHash('sha256').update(JSON.stringify(rows)).digest('hex');
    // On a mismatch: if the analysis behind the flags or the interval evidence changed, raise
    // SUMMARY_FORMAT (app/api/history/summaries.ts) and put the new hash here, both in the same change
    // (a regenerated demo lab changes the hash too; raising the format then costs only a
    // recomputation in files that hold summaries).
    expect({ format: SUMMARY_FORMAT, sha256 }).toEqual({
      format: 2,
      sha256: '551a889a7a235842ddbfa5a6d2c80e41a182268c6c1dfa8d9d919742cd0fbf4e',
    });
  });

  it('notice a check recorded by another process, and recompute only that meter', async () => {
    await answers(api);
    const inService = new Set(
      bundle.meters.filter((m) => (m.state ?? 'in-service') === 'in-service').map((m) => m.assetId),
    );
    const doc = JSON.parse(
      JSON.stringify([...bundle.checks].reverse().find((c) => inService.has(c.meter))),
    ) as (typeof bundle.checks)[number];
    const other = another();
    await other.api.recordCheck({ ...doc, date: dayAfter(doc.date) });

    const before = summariesComputed(db);
    const expected = await fresh({ db, api });
    expect(await answers(api)).toStrictEqual(expected);
    const after = summariesComputed(db);
    expect(after.flags - before.flags).toBe(1);

    // The summary made here after that check is what the next process reads.
    const next = another();
    expect(await answers(next.api)).toStrictEqual(expected);
    expect(summariesComputed(next.db).flags).toBe(0);
  }, 120_000);

  it('made by another version of the analysis, or dropped with their table, are only recomputed', async () => {
    const expected = await fresh({ db, api });
    db.prepare("UPDATE meter_summary SET made_by = 'an older version'").run();
    forgetSummaries(db);
    expect(await answers(api)).toStrictEqual(expected);
    const counts = summariesComputed(db);
    expect(
      (
        db.prepare('SELECT count(*) AS n FROM meter_summary WHERE made_by = ?').get(SUMMARIES_MADE_BY) as {
          n: number;
        }
      ).n,
    ).toBeGreaterThan(0);

    db.exec('DROP TABLE meter_summary');
    forgetSummaries(db);
    expect(await answers(api)).toStrictEqual(expected);
    expect(summariesComputed(db).flags).toBeGreaterThan(counts.flags);
    expect(summariesComputed(db).stored).toBe(counts.stored);
    db.exec(
      `CREATE TABLE meter_summary (meter_id INTEGER NOT NULL REFERENCES meter (id),
         kind TEXT NOT NULL CHECK (kind IN ('flags', 'attributes')), generation INTEGER NOT NULL,
         made_by TEXT NOT NULL, summary_json TEXT NOT NULL, PRIMARY KEY (meter_id, kind)) WITHOUT ROWID`,
    );
  }, 120_000);

  it('are not written to a read-only file, nor while another process holds the write lock', async () => {
    const expected = await fresh({ db, api });
    db.exec('DELETE FROM meter_summary');

    const readOnly = another({ readonly: true });
    expect(await answers(readOnly.api)).toStrictEqual(expected);
    expect(summariesComputed(readOnly.db).flags).toBeGreaterThan(0);
    expect(summariesComputed(readOnly.db).stored).toBe(0);
    expect(storedRows(db)).toBe(0);

    const holder = another();
    holder.db.exec('BEGIN IMMEDIATE');
    try {
      const busy = another();
      expect(await answers(busy.api)).toStrictEqual(expected);
      expect(summariesComputed(busy.db).stored).toBe(0);
      // The service's own short wait on the lock is kept (busy.ts retries beyond it).
      expect(busy.db.pragma('busy_timeout', { simple: true })).toBe(BUSY_ATTEMPT_MS);
    } finally {
      holder.db.exec('ROLLBACK');
    }
    expect(storedRows(db)).toBe(0);
  }, 120_000);
});
