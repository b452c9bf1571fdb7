// Migration 0006 (meter generations): it gives every meter of a file at schema 5 a generation, and
// its triggers raise the generation of exactly the meter whose checks or state change.
import { describe, expect, it } from 'vitest';
import { createLabService } from '../../app/api/service';
import { migrate, openLabDb, schemaVersion } from '../../db/store';
import { clock, goodCheck, seed } from '../fixtures/lab';
import { withLaterColumns } from '../fixtures/later-columns';

const generations = (db: ReturnType<typeof openLabDb>) =>
  db
    .prepare(
      'SELECT m.asset_id, g.generation FROM meter m JOIN meter_generation g ON g.meter_id = m.id ORDER BY m.asset_id',
    )
    .all();

describe('migration 0006_summaries', () => {
  it('numbers the meters of a file at schema 5, and its triggers follow each change', async () => {
    const db = openLabDb(':memory:', { targetVersion: 5 });
    withLaterColumns(db);
    const api = createLabService(db, { clock });
    await seed(api);
    await api.recordCheck(goodCheck());
    migrate(db, 6);
    expect(schemaVersion(db)).toBe(6);
    expect(generations(db)).toEqual([
      { asset_id: 'TW-01', generation: 1 },
      { asset_id: 'TW-02', generation: 1 },
    ]);
    // A check: its revision and each of its points raise TW-01's generation, TW-02's stays.
    await api.recordCheck(goodCheck({ date: '2026-11-25' }));
    const [one, two] = generations(db) as { generation: number }[];
    expect(one?.generation).toBeGreaterThan(1);
    expect(two?.generation).toBe(1);
    await api.changeMeterState({ assetId: 'TW-02', state: 'quarantined', reason: 'dropped on the bench' });
    expect((generations(db) as { generation: number }[])[1]?.generation).toBe(2);
    db.close();
  });
});
