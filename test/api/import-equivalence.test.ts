// The bulk import (importCsv: one validate-and-write pass per check inside one transaction, lab
// settings, meters and standards looked up once per import, prepared statements kept, rows read
// by app/formats/csv-rows.ts, a point's readings in one statement) stores
// exactly what recording each check on its own stores. On the demo lab: every check recorded
// through recordCheck, its history exported, and that CSV imported into a lab with the same
// settings, people, standards and meters give the same export, the same getCheck JSON for every
// check, and byte-identical stored points (result JSON included, so records re-render the same).
// Also: a refusal in the last check of a file leaves no earlier check behind, a new performer
// named in the file is created once, and a CSV row of the wrong length is refused as before.
import { beforeAll, describe, expect, it } from 'vitest';
import type { LabApi } from '../../app/api/contract';
import { LabError } from '../../app/api/errors';
import { PACK_MARK } from '../../db/codec/point-pack';
import { createLabService } from '../../app/api/service';
import { openLabDb, type LabDb } from '../../db/store';
import { loadBundle, readSampleBundle, type SampleBundle } from '../../sample-lab/load';
import { clock } from '../fixtures/lab';

let bundle: SampleBundle;
let recorded: { db: LabDb; api: LabApi };
let csv: string;

/** A lab with the demo lab's settings, people, standards and meters (all in service), no checks. */
async function emptyDemoLab(): Promise<{ db: LabDb; api: LabApi }> {
  const db = openLabDb(':memory:');
  const api = createLabService(db, { clock });
  await api.updateLab(bundle.lab);
  for (const p of bundle.people) await api.createPerson(p);
  for (const s of bundle.standards) await api.createStandard(s);
  for (const m of bundle.meters) await api.createMeter({ ...m, state: 'in-service' });
  return { db, api };
}

async function everyCheck(lab: { db: LabDb; api: LabApi }): Promise<unknown[]> {
  const ids = lab.db.prepare('SELECT id FROM check_event ORDER BY id').pluck().all() as number[];
  const out: unknown[] = [];
  for (const id of ids) out.push(await lab.api.getCheck(id));
  return out;
}

const storedPoints = (db: LabDb) => db.prepare('SELECT * FROM check_point ORDER BY id').all();
const storedReadings = (db: LabDb) => db.prepare('SELECT * FROM reading ORDER BY point_id, seq').all();
const count = (db: LabDb, table: string) =>
  db.prepare(`SELECT count(*) FROM ${table}`).pluck().get() as number;

async function refusal(p: Promise<unknown>): Promise<LabError> {
  try {
    await p;
  } catch (e) {
    if (e instanceof LabError) return e;
    throw e;
  }
  throw new Error('expected a refusal');
}

beforeAll(async () => {
  bundle = readSampleBundle();
  const db = openLabDb(':memory:');
  const api = createLabService(db, { clock });
  // The checks only: present states (a withdrawn meter) would refuse the import of its history.
  await loadBundle(api, { ...bundle, meters: bundle.meters.map((m) => ({ ...m, state: 'in-service' })) });
  recorded = { db, api };
  csv = await api.exportCsv();
}, 120_000);

describe('the bulk import against checks recorded one at a time (demo lab)', () => {
  it('stores the same checks, points, readings and results', async () => {
    const imported = await emptyDemoLab();
    const r = await imported.api.importCsv(csv);
    expect(r.checksImported).toBe(bundle.checks.length);
    expect(r.checksImported).toBeGreaterThan(100);
    expect(await imported.api.exportCsv()).toBe(csv);
    expect(await everyCheck(imported)).toEqual(await everyCheck(recorded));
    // Byte for byte, result_json included: what a record re-renders from later. Both paths
    // store it packed (test/api/point-pack.test.ts shows it reads back as the JSON did).
    expect(storedPoints(imported.db)).toEqual(storedPoints(recorded.db));
    expect(
      (storedPoints(imported.db) as { result_json: string }[]).every((p) =>
        p.result_json.startsWith(PACK_MARK),
      ),
    ).toBe(true);
    expect(storedReadings(imported.db)).toEqual(storedReadings(recorded.db));
    expect(await imported.api.listDue({ withinDays: 3650 })).toEqual(
      await recorded.api.listDue({ withinDays: 3650 }),
    );
  }, 120_000);

  it('imports the same file in pieces to the same result as in one piece', async () => {
    const whole = await emptyDemoLab();
    await whole.api.importCsv(csv);
    const pieces = await emptyDemoLab();
    const [header, ...rows] = csv.split('\r\n');
    // Split between meters, so no check is cut in two.
    const byMeter = new Map<string, string[]>();
    for (const row of rows) {
      const meter = row.split(',')[0] ?? '';
      byMeter.set(meter, [...(byMeter.get(meter) ?? []), row]);
    }
    expect(byMeter.size).toBeGreaterThan(3);
    for (const part of byMeter.values()) await pieces.api.importCsv([header, ...part].join('\r\n'));
    const sameOrder = (lab: { db: LabDb }) =>
      lab.db
        .prepare(
          `SELECT m.asset_id, cr.performed_on, cp.seq, cp.result_json FROM check_point cp
           JOIN check_revision cr ON cr.id = cp.revision_id JOIN check_event ce ON ce.id = cr.check_id
           JOIN meter m ON m.id = ce.meter_id ORDER BY m.asset_id, cr.performed_on, cp.seq`,
        )
        .all();
    expect(sameOrder(pieces)).toEqual(sameOrder(whole));
  }, 120_000);

  it('a refusal in the last check of a file leaves no earlier check of it behind', async () => {
    const lab = await emptyDemoLab();
    const lines = csv.split('\r\n');
    // The export ends with a line break: the last row is the line before the empty last one.
    const last = lines.length - 2;
    // The last row's reading made unreadable: every check before it validates and is written
    // first, so only the rollback keeps them out.
    const cells = (lines[last] ?? '').split(',');
    cells[16] = 'abc';
    lines[last] = cells.join(',');
    const before = { checks: count(lab.db, 'check_event'), audit: count(lab.db, 'audit_entry') };
    const e = await refusal(lab.api.importCsv(lines.join('\r\n')));
    expect(e.message).toMatch(/^lines \d+-\d+: points\[\d+\]\.readings\[\d\]\.value/);
    expect({ checks: count(lab.db, 'check_event'), audit: count(lab.db, 'audit_entry') }).toEqual(before);
    expect(await lab.api.exportCsv()).toBe(await (await emptyDemoLab()).api.exportCsv());
  }, 120_000);

  it('creates a performer the file names once, for all of their checks', async () => {
    const lab = await emptyDemoLab();
    const performers = new Set(
      csv
        .split('\r\n')
        .slice(1)
        .map((l) => l.split(',')[2]),
    );
    const first = [...performers][0] as string;
    const renamed = csv.replaceAll(`,${first},`, ',Wren Okonkwo-Test,');
    const people = (await lab.api.listPeople()).length;
    await lab.api.importCsv(renamed);
    const after = await lab.api.listPeople();
    expect(after.length).toBe(people + 1);
    const id = after.find((p) => p.name === 'Wren Okonkwo-Test')?.id;
    expect(id).toBeDefined();
    const theirs = lab.db
      .prepare('SELECT count(DISTINCT performer_id) FROM check_revision WHERE performer_id = ?')
      .pluck()
      .get(id) as number;
    expect(theirs).toBe(1);
    expect(count(lab.db, 'check_revision')).toBe(bundle.checks.length);
  }, 120_000);

  it('refuses a row of the wrong length with the same words as before', async () => {
    const lab = await emptyDemoLab();
    const lines = csv.split('\r\n').slice(0, 4);
    lines[2] = `${lines[2] ?? ''},extra`;
    const e = await refusal(lab.api.importCsv(lines.join('\r\n')));
    expect(e.message).toBe('csv: Invalid Record Length: columns length is 21, got 22 on line 3');
    expect(count(lab.db, 'check_event')).toBe(0);
  });
});
