// A large import written by its own thread (app/api/import-writer.ts) makes the very file the
// service's own transaction makes; a refusal or a failure in the writer leaves the file as it was
// and the thread ready for the next import; a write asked for during an import waits for it.
import Database from 'better-sqlite3';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { LabApi } from '../../app/api/contract';
import { closeImportWriter, importWriterFor } from '../../app/api/import-writer';
import { createLabService, WRITER_THREAD_MIN_CHECKS } from '../../app/api/service';
import { openLabDb, type LabDb } from '../../db/store';
import { createFleet, historyCsv } from '../bench/fleet-data';
import { clock } from '../fixtures/lab';

const METERS = 6;
/** Tables an import writes, with the column that orders their rows. */
const TABLES = [
  'person',
  'check_event',
  'check_revision',
  'check_revision_standard',
  'check_point',
  'reading',
  'audit_entry',
  'meter_generation',
];

let dir: string;
const opened: LabDb[] = [];

async function lab(name: string, threaded: boolean): Promise<{ db: LabDb; api: LabApi; file: string }> {
  const file = path.join(dir, `${name}.dipledger`);
  const db = openLabDb(file, { create: true });
  opened.push(db);
  const api = createLabService(db, { clock, writerThreadMinChecks: threaded ? undefined : Infinity });
  await createFleet(api, METERS);
  return { db, api, file };
}

/** Every row of the tables an import writes, as stored. */
function contents(file: string): Record<string, unknown[][]> {
  const raw = new Database(file, { readonly: true });
  try {
    return Object.fromEntries(
      TABLES.map((t) => {
        // reading has no rowid (migration 0009): its key orders it.
        const order = t === 'reading' ? 'point_id, seq' : 'rowid';
        return [t, raw.prepare(`SELECT * FROM ${t} ORDER BY ${order}`).raw().all() as unknown[][]];
      }),
    );
  } catch (e) {
    raw.close();
    throw e;
  } finally {
    if (raw.open) raw.close();
  }
}

/** A history with one performer the lab does not know yet (added by the import, once). */
function history(): string {
  const { csv } = historyCsv(0, METERS);
  const lines = csv.split('\r\n');
  const header = (lines[0] as string).split(',');
  const performer = header.indexOf('performer');
  const date = header.indexOf('date');
  return lines
    .map((line, i) => {
      const cells = line.split(',');
      if (i > 0 && cells[date]?.startsWith('2010')) cells[performer] = 'Ilse Varga-Moreau';
      return cells.join(',');
    })
    .join('\r\n');
}

beforeAll(() => {
  dir = mkdtempSync(path.join(tmpdir(), 'dipledger-import-writer-'));
});

afterAll(async () => {
  for (const db of opened) {
    await closeImportWriter(db);
    if (db.open) db.close();
  }
  rmSync(dir, { recursive: true, force: true });
});

describe('import through the writer thread', () => {
  it('writes the same rows, hash chain included, as the service own transaction', async () => {
    const csv = history();
    const threaded = await lab('threaded', true);
    const own = await lab('own', false);
    const a = await threaded.api.importCsv(csv);
    const b = await own.api.importCsv(csv);
    expect(a.checksImported).toBe(METERS * 25);
    expect(a.checksImported).toBeGreaterThanOrEqual(WRITER_THREAD_MIN_CHECKS);
    expect(a).toEqual(b);
    // The writer thread did the writing: its connection is the one the import used.
    expect(await importWriterFor(threaded.db)).toBeDefined();
    const x = contents(threaded.file);
    const y = contents(own.file);
    expect(x.check_point?.length).toBe(a.pointsImported);
    expect(x.person?.filter((p) => p[1] === 'Ilse Varga-Moreau')).toHaveLength(1);
    for (const t of TABLES) expect(x[t], t).toEqual(y[t]);
    // And the service reads back what it would have written itself.
    expect(await threaded.api.listDue({ withinDays: 3650 })).toEqual(
      await own.api.listDue({ withinDays: 3650 }),
    );
  });

  it('rolls the whole import back on a refusal, and imports the next file', async () => {
    const l = await lab('refused', true);
    const before = contents(l.file);
    const lines = history().split('\r\n');
    // Line 5,000 is a check well into the import, after many were written by the thread.
    const header = (lines[0] as string).split(',');
    const bad = (lines[4999] as string).split(',');
    bad[header.indexOf('reading')] = 'twelve';
    lines[4999] = bad.join(',');
    await expect(l.api.importCsv(lines.join('\r\n'))).rejects.toThrow(/^lines \d+-\d+: /);
    expect(contents(l.file)).toEqual(before);
    const ok = await l.api.importCsv(history());
    expect(ok.checksImported).toBe(METERS * 25);
  });

  it('rolls back when the writer itself fails, and says why', async () => {
    const l = await lab('failing', true);
    const raw = new Database(l.file);
    raw.exec(`CREATE TRIGGER refuse_one BEFORE INSERT ON check_point
      WHEN (SELECT count(*) FROM check_event) > 100
      BEGIN SELECT RAISE(ABORT, 'refused by a test trigger'); END`);
    const before = contents(l.file);
    await expect(l.api.importCsv(history())).rejects.toThrow('refused by a test trigger');
    expect(contents(l.file)).toEqual(before);
    raw.exec('DROP TRIGGER refuse_one');
    raw.close();
    expect((await l.api.importCsv(history())).checksImported).toBe(METERS * 25);
  });

  it('holds back a write asked for during the import until the import is written', async () => {
    const l = await lab('queued', true);
    const importing = l.api.importCsv(history());
    const person = l.api.createPerson({ name: 'Tarek Lindqvist-Obi', role: 'technician' });
    const [imported] = await Promise.all([importing, person]);
    expect(imported.checksImported).toBe(METERS * 25);
    const rows = contents(l.file);
    // The person came after every check of the import, in the audit trail and in the table.
    const audit = rows.audit_entry as unknown[][];
    const last = audit[audit.length - 1] as unknown[];
    expect(last[4]).toBe('person');
    expect(audit.filter((e) => e[3] === 'import')).toHaveLength(METERS * 25);
  });

  it('has no thread for a lab that has no file of its own', async () => {
    const db = openLabDb(':memory:');
    expect(await importWriterFor(db)).toBeUndefined();
    db.close();
  });
});
