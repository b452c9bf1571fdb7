// Migration 0005 (issued documents): it runs on a file at schema 4, and an issued document, once
// written, can be neither edited nor deleted (ISO/IEC 17025:2017 7.8.8: changes are new documents).
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { migrate, openLabDb, schemaVersion } from '../../db/store';
import { goodCheck, seededLab } from '../fixtures/lab';

describe('migration 0005_documents', () => {
  it('adds the document tables to a file at schema 4', () => {
    const db = openLabDb(':memory:', { targetVersion: 4 });
    const tables = () =>
      (db.prepare("SELECT name FROM sqlite_master WHERE type = 'table'").all() as { name: string }[]).map(
        (r) => r.name,
      );
    expect(tables()).not.toContain('issued_document');
    migrate(db, 5);
    expect(schemaVersion(db)).toBe(5);
    expect(tables()).toEqual(expect.arrayContaining(['issued_document', 'issued_document_signature']));
    db.close();
  });

  it('refuses to edit or delete an issued document', async () => {
    const file = path.join(mkdtempSync(path.join(tmpdir(), 'dipledger-doc-mig-')), 'lab.dipledger');
    const lab = await seededLab(file);
    await lab.api.enrolSigner({ name: 'Ada Fenwick', passphrase: 'ada-passphrase-1' });
    const rec = await lab.api.recordCheck(goodCheck());
    await lab.api.signCheck({ checkId: rec.checkId, person: 'Ada Fenwick', passphrase: 'ada-passphrase-1' });
    const doc = await lab.api.issueSheet({ checkId: rec.checkId });
    lab.close();
    const db = openLabDb(file);
    expect(() =>
      db.prepare('UPDATE issued_document SET sha256 = ? WHERE number = ?').run('0'.repeat(64), doc.number),
    ).toThrow(/never changed: issue a replacement/);
    expect(() => db.prepare('DELETE FROM issued_document').run()).toThrow(/never deleted/);
    expect(() => db.prepare('DELETE FROM issued_document_signature').run()).toThrow(/never deleted/);
    const row = db
      .prepare('SELECT sha256, length(pdf) AS n FROM issued_document WHERE number = ?')
      .get(doc.number) as {
      sha256: string;
      n: number;
    };
    expect(row).toEqual({ sha256: doc.sha256, n: doc.byteLength });
    db.close();
  });
});
