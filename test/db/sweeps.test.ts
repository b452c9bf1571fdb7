// Migration 0003 (sweeps): the table and its row converters round-trip a trace exactly, and a sweep
// of a revision that is no longer a draft cannot be changed or deleted (second line of defence).
import { describe, expect, it } from 'vitest';
import { createLabService } from '../../app/api/service';
import { getSweepsOfCheck } from '../../db/queries/sweeps';
import { openLabDb } from '../../db/store';
import { clock, goodCheck, seed } from '../fixtures/lab';
import { syntheticSweep } from '../fixtures/sweeps';

describe('sweep table (0003)', () => {
  it('stores the trace exactly and locks it once the revision leaves draft', async () => {
    const db = openLabDb(':memory:');
    const api = createLabService(db, { clock });
    await seed(api);
    const s = syntheticSweep([{ f0Hz: 10.004e9, loadedQ: 2000, depthDb: 2 }], {
      startHz: 9.974e9,
      stopHz: 10.034e9,
      points: 601,
      seed: 21,
    });
    const text = ['frequency_Hz,power_W', ...s.frequencyHz.map((f, i) => `${f},${s.power[i]}`)].join('\n');
    const rec = await api.recordCheck({
      ...goodCheck(),
      method: 'sweep',
      points: [{ dialSetting: '10 GHz', sweep: { text } }],
    } as never);
    const [sweep] = getSweepsOfCheck(db, rec.checkId);
    expect(sweep?.frequencyHz).toEqual(s.frequencyHz);
    expect(sweep?.level).toEqual(s.power);
    expect(sweep?.imag).toBeNull();
    // Signing properly needs keys and a passphrase (records work); to test this table's own lock in
    // isolation, the in-memory copy lets the revision leave draft without a signature.
    const guards = db
      .prepare("SELECT name FROM sqlite_master WHERE type = 'trigger' AND sql LIKE '%only with a signature%'")
      .all() as { name: string }[];
    for (const g of guards) db.exec(`DROP TRIGGER "${g.name}"`);
    db.prepare("UPDATE check_revision SET state = 'signed' WHERE check_id = ?").run(rec.checkId);
    expect(() => db.prepare('UPDATE sweep SET dial_setting = 1').run()).toThrow(/never changed/);
    expect(() => db.prepare('DELETE FROM sweep').run()).toThrow(/never deleted/);
    db.close();
  });

  it('is created by the migrations on an empty file', () => {
    const db = openLabDb(':memory:');
    const cols = (db.prepare('PRAGMA table_info(sweep)').all() as { name: string }[]).map((c) => c.name);
    expect(cols).toEqual(
      expect.arrayContaining(['point_id', 'dial_setting', 'trace', 'f0_hz', 'u_f0_hz', 'fit_json']),
    );
    db.close();
  });
});
