// The schema: every migration on an empty database, refusal of newer and foreign files, and
// the triggers that keep signed records and the audit trail from being edited.
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { LATEST_VERSION, MIGRATIONS } from '../../db/migrations';
import { APPLICATION_ID, StoreError, openLabDb, schemaVersion } from '../../db/store';
import { seededLab, goodCheck } from '../fixtures/lab';

const tmp = () => mkdtempSync(path.join(tmpdir(), 'dipledger-db-'));

describe('migrations', () => {
  it('are numbered 1, 2, 3... with no gaps', () => {
    expect(MIGRATIONS.map((m) => m.version)).toEqual(MIGRATIONS.map((_, i) => i + 1));
    expect(LATEST_VERSION).toBe(MIGRATIONS.length);
  });

  it('all run on an empty in-memory database and are recorded in the file', () => {
    const db = openLabDb(':memory:');
    expect(schemaVersion(db)).toBe(LATEST_VERSION);
    expect(db.pragma('application_id', { simple: true })).toBe(APPLICATION_ID);
    const applied = db.prepare('SELECT version, name FROM schema_migration ORDER BY version').all();
    expect(applied).toEqual(MIGRATIONS.map((m) => ({ version: m.version, name: m.name })));
    const tables = (
      db.prepare("SELECT name FROM sqlite_master WHERE type = 'table'").all() as { name: string }[]
    ).map((t) => t.name);
    for (const t of [
      'lab',
      'meter',
      'standard',
      'standard_certificate',
      'check_event',
      'check_revision',
      'check_point',
      'reading',
      'person',
      'audit_entry',
    ]) {
      expect(tables).toContain(t);
    }
    expect(db.pragma('foreign_keys', { simple: true })).toBe(1);
    db.close();
  });

  it('are idempotent: opening a migrated file again changes nothing', () => {
    const file = path.join(tmp(), 'lab.dipledger');
    openLabDb(file, { create: true }).close();
    const again = openLabDb(file);
    expect((again.prepare('SELECT count(*) AS n FROM schema_migration').get() as { n: number }).n).toBe(
      LATEST_VERSION,
    );
    expect(again.pragma('journal_mode', { simple: true })).toBe('wal');
    expect(again.pragma('busy_timeout', { simple: true })).toBe(5000);
    again.close();
  });

  it('stops at a target version, so a data-changing migration can be tested from N-1', () => {
    const db = openLabDb(':memory:', { targetVersion: 0 });
    expect(schemaVersion(db)).toBe(0);
    db.close();
  });

  // Each data-changing migration gets its own test here: migrate to N-1, insert rows, migrate
  // to N, compare. 0001 creates the schema and changes no data, so it has none yet.
});

describe('opening files', () => {
  it('refuses a file written by a newer version and leaves it byte-for-byte unchanged', () => {
    const file = path.join(tmp(), 'newer.dipledger');
    openLabDb(file, { create: true }).close();
    const raw = new Database(file);
    raw.pragma(`user_version = ${LATEST_VERSION + 1}`);
    raw.pragma('journal_mode = DELETE');
    raw.close();
    const before = readFileSync(file);
    expect(() => openLabDb(file)).toThrow(StoreError);
    expect(() => openLabDb(file)).toThrow(/newer Dipledger \(schema \d+; this version knows up to \d+\)/);
    expect(readFileSync(file).equals(before)).toBe(true);
  });

  it('refuses a SQLite file that is not a lab file, and a missing file', () => {
    const dir = tmp();
    const other = path.join(dir, 'other.db');
    const raw = new Database(other);
    raw.exec('CREATE TABLE t (x)');
    raw.close();
    expect(() => openLabDb(other)).toThrow(/not a Dipledger lab file/);
    expect(() => openLabDb(path.join(dir, 'absent.dipledger'))).toThrow(/no lab file/);
    writeFileSync(path.join(dir, 'junk.dipledger'), 'not a database at all, just text '.repeat(40));
    expect(() => openLabDb(path.join(dir, 'junk.dipledger'))).toThrow();
  });
});

describe('append-only records (second line behind the API)', () => {
  it('forbids editing or deleting audit entries', () => {
    const db = openLabDb(':memory:');
    db.prepare(
      "INSERT INTO audit_entry (at, actor, action, entity, entity_id, prev_hash, hash) VALUES ('t', 'a', 'create', 'x', '1', '0', 'h1')",
    ).run();
    expect(() => db.prepare("UPDATE audit_entry SET actor = 'b'").run()).toThrow(/append-only/);
    expect(() => db.prepare('DELETE FROM audit_entry').run()).toThrow(/append-only/);
    db.close();
  });

  it('forbids changing a signed revision, its points and readings, but lets it be marked amended', async () => {
    const dir = tmp();
    const file = path.join(dir, 'lab.dipledger');
    const lab = await seededLab(file);
    await lab.api.recordCheck(goodCheck());
    lab.close();
    const db = openLabDb(file);
    // A revision turns signed only once a signature row exists (0002); the signing itself is
    // tested in test/api/records.test.ts, here the rows are written directly to reach the trigger.
    db.prepare(
      `INSERT INTO person_key (person_id, public_key_pem, fingerprint, kdf, kdf_n, kdf_r, kdf_p, salt_b64,
         iv_b64, tag_b64, encrypted_private_key_b64, created_at)
       SELECT performer_id, 'pem', 'fp', 'scrypt', 16384, 8, 1, 's', 'i', 't', 'k', 't' FROM check_revision`,
    ).run();
    db.prepare(
      `INSERT INTO check_signature (revision_id, seq, person_id, key_id, printed_name, role, meaning, signed_at,
         payload_sha256, signature_b64) SELECT id, 1, performer_id, 1, 'n', 'technician', 'performed', 't', 'h', 's'
       FROM check_revision`,
    ).run();
    db.prepare("UPDATE check_revision SET state = 'signed'").run();
    expect(() => db.prepare('UPDATE check_revision SET remarks = ?').run('edited later')).toThrow(
      /never changed/,
    );
    expect(() => db.prepare('UPDATE check_point SET error_hz = 0').run()).toThrow(/never changed/);
    expect(() => db.prepare('UPDATE reading SET value = 1').run()).toThrow(/never changed/);
    expect(() => db.prepare('DELETE FROM reading').run()).toThrow(/never deleted/);
    expect(() => db.prepare('DELETE FROM check_revision').run()).toThrow(/never deleted/);
    expect(db.prepare("UPDATE check_revision SET state = 'amended'").run().changes).toBe(1);
    db.close();
  });
});
