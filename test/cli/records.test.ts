// The records commands as a user runs them: enrolling and signing with a passphrase from a
// file or the environment, amendments, state changes, `integrity` finding a byte edited in
// the file outside the app (naming the record), and `backup` with the documented restore.
import { copyFileSync, existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { runCli, type CliIo } from '../../app/cli/main';
import { openApi } from '../../app/api/open';
import { clock, goodCheck, seededLab } from '../fixtures/lab';

function io(cwd: string, env: NodeJS.ProcessEnv = {}): CliIo & { stdout: string[]; stderr: string[] } {
  const stdout: string[] = [];
  const stderr: string[] = [];
  return { stdout, stderr, out: (t) => stdout.push(t), err: (t) => stderr.push(t), env, cwd, clock };
}

/** A lab file with Ada and Bo enrolled through the CLI and check 1 signed by both. */
async function signedLab(remarks = 'remark-ZQX-4417'): Promise<{ dir: string; file: string }> {
  const dir = mkdtempSync(path.join(tmpdir(), 'dipledger-cli-records-'));
  const file = path.join(dir, 'lab.dipledger');
  const lab = await seededLab(file);
  await lab.api.recordCheck(goodCheck({ remarks }));
  lab.close();
  writeFileSync(path.join(dir, 'ada.pass'), 'ada-passphrase-1\n');
  const run = (args: string[], env: NodeJS.ProcessEnv = {}) => runCli(['--db', file, ...args], io(dir, env));
  expect(await run(['person', 'add', 'Ada Fenwick', '--passphrase-file', 'ada.pass'])).toBe(0);
  expect(await run(['person', 'add', 'Bo Marsh'], { DIPLEDGER_PASSPHRASE: 'bo-passphrase-22' })).toBe(0);
  expect(await run(['sign', '1', '--as', 'Ada Fenwick', '--passphrase-file', 'ada.pass'])).toBe(0);
  expect(await run(['sign', '1', '--as', 'Bo Marsh'], { DIPLEDGER_PASSPHRASE: 'bo-passphrase-22' })).toBe(0);
  return { dir, file };
}

async function integrity(file: string): Promise<{ code: number; text: string }> {
  const o = io(path.dirname(file));
  const code = await runCli(['--db', file, 'integrity'], o);
  return { code, text: [...o.stdout, ...o.stderr].join('\n') };
}

/** Changes one byte of the file where `marker` is stored, as an editor outside the app would. */
function editByte(file: string, marker: string): void {
  const bytes = readFileSync(file);
  const at = bytes.indexOf(Buffer.from(marker, 'utf8'));
  expect(at).toBeGreaterThan(0);
  expect(bytes.indexOf(Buffer.from(marker, 'utf8'), at + 1)).toBe(-1);
  bytes[at] = bytes[at]! ^ 0x01;
  writeFileSync(file, bytes);
}

describe('dipledger sign / person add / check', () => {
  it('signs with the passphrase from a file or the environment and shows who signed, when, and why', async () => {
    const { dir, file } = await signedLab();
    const o = io(dir);
    expect(await runCli(['--db', file, 'check', '1'], o)).toBe(0);
    const text = o.stdout.join('\n');
    expect(text).toMatch(/1\s+performed\s+Ada Fenwick\s+technician\s+2026-12-01T09:30:00.000Z/);
    expect(text).toMatch(/2\s+reviewed\s+Bo Marsh\s+reviewer/);
    expect(text).toMatch(/SRC-A {2}certificate C-2026-1 \(Calibration body one\), 2026-06-01 to 2027-06-01/);
    expect((await integrity(file)).code).toBe(0);
  });

  it('a wrong passphrase exits 2, says so, and records only the refused attempt', async () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'dipledger-cli-records-'));
    const file = path.join(dir, 'lab.dipledger');
    const lab = await seededLab(file);
    await lab.api.recordCheck(goodCheck());
    await lab.api.enrolSigner({ name: 'Ada Fenwick', passphrase: 'ada-passphrase-1' });
    lab.close();
    const before = readFileSync(file);
    const o = io(dir, { DIPLEDGER_PASSPHRASE: 'wrong-passphrase' });
    expect(await runCli(['--db', file, 'sign', '1', '--as', 'Ada Fenwick'], o)).toBe(2);
    expect(o.stderr.join('\n')).toMatch(
      /passphrase does not open Ada Fenwick's signing key: nothing was signed/,
    );
    expect(o.stderr.join('\n')).not.toContain('wrong-passphrase');
    // Nothing is signed; the refused attempt is the one thing written (the audit trail notices
    // failed signing attempts), and it never carries the passphrase.
    expect(readFileSync(file).equals(before)).toBe(false);
    const db = new Database(file, { readonly: true });
    const entries = db
      .prepare('SELECT action, after_json FROM audit_entry ORDER BY id DESC LIMIT 2')
      .all() as {
      action: string;
      after_json: string | null;
    }[];
    const signatures = db.prepare('SELECT count(*) FROM check_signature').pluck().get();
    db.close();
    expect(entries[0]?.action).toBe('sign-refused');
    expect(entries[1]?.action).not.toBe('sign-refused');
    expect(JSON.stringify(entries)).not.toContain('wrong-passphrase');
    expect(signatures).toBe(0);
    expect((await integrity(file)).code).toBe(0);
  });

  it('refuses to ask for a passphrase without a terminal', async () => {
    const { dir, file } = await signedLab();
    const o = io(dir);
    expect(await runCli(['--db', file, 'person', 'add', 'Cy New', '--role', 'reviewer'], o)).toBe(2);
    expect(o.stderr.join('\n')).toMatch(
      /--passphrase-file FILE \(or DIPLEDGER_PASSPHRASE, for automation only\)/,
    );
  });

  it('amends with a reason and changes meter state with a reason, all audited', async () => {
    const { dir, file } = await signedLab();
    writeFileSync(path.join(dir, 'fix.json'), JSON.stringify(goodCheck({ remarks: 'corrected remark' })));
    const o = io(dir);
    expect(await runCli(['--db', file, 'amend', '1', 'fix.json', '--reason', 'remark was wrong'], o)).toBe(0);
    expect(o.stdout.join('\n')).toMatch(/amended by local user|amended by .* at 2026-12-01/);
    expect(o.stdout.join('\n')).toMatch(/changed remarks: "remark-ZQX-4417" -> "corrected remark"/);
    const q = io(dir);
    expect(await runCli(['--db', file, 'quarantine', 'TW-01', '--reason', 'dial slips'], q)).toBe(0);
    expect(q.stdout.join('\n')).toBe('TW-01 is now quarantined');
    const noReason = io(dir);
    expect(await runCli(['--db', file, 'reinstate', 'TW-01'], noReason)).toBe(2);
    expect(
      await runCli(['--db', file, 'reinstate', 'TW-01', '--reason', 'dial repaired and checked'], io(dir)),
    ).toBe(0);
    const a = io(dir);
    expect(await runCli(['--db', file, '--json', 'audit', '--entity', 'meter', '--id', 'TW-01'], a)).toBe(0);
    const trail = JSON.parse(a.stdout.join('\n')) as {
      action: string;
      after: { state?: string; reason?: string };
    }[];
    expect(trail.slice(0, 2).map((e) => [e.action, e.after.state, e.after.reason])).toEqual([
      ['change-state', 'in-service', 'dial repaired and checked'],
      ['change-state', 'quarantined', 'dial slips'],
    ]);
    // --meter: the meter's own entries and those of its checks, newest first.
    const m = io(dir);
    expect(await runCli(['--db', file, '--json', 'audit', '--meter', 'TW-01'], m)).toBe(0);
    const whole = JSON.parse(m.stdout.join('\n')) as { action: string; entity: string; entityId: string }[];
    expect(whole.map((e) => `${e.action} ${e.entity}`)).toEqual(
      expect.arrayContaining([
        'change-state meter',
        'amend check',
        'sign check',
        'record check',
        'create meter',
      ]),
    );
    expect(whole.every((e) => (e.entity === 'meter' ? e.entityId === 'TW-01' : e.entity === 'check'))).toBe(
      true,
    );
    expect((await integrity(file)).code).toBe(0);
  });
});

describe('dipledger integrity', () => {
  it('finds a byte edited in a signed record and names the record', async () => {
    const { file } = await signedLab();
    expect((await integrity(file)).code).toBe(0);
    editByte(file, 'remark-ZQX-4417');
    const r = await integrity(file);
    expect(r.code).toBe(1);
    expect(r.text).toMatch(
      /check 1 revision 1: the performed signature of Ada Fenwick .* does not match the record/,
    );
    expect(r.text).toMatch(/check 1 revision 1: the reviewed signature of Bo Marsh/);
    expect(r.text).toMatch(/affects: check 1 revision 1 cannot be trusted as signed/);
  });

  it('finds a byte edited in an audit entry and names the first broken link', async () => {
    const { dir, file } = await signedLab();
    expect(await runCli(['--db', file, 'withdraw', 'TW-02', '--reason', 'dropped-KPW-9921'], io(dir))).toBe(
      0,
    );
    expect(
      await runCli(['--db', file, 'reinstate', 'TW-02', '--reason', 'repaired and checked'], io(dir)),
    ).toBe(0);
    editByte(file, 'dropped-KPW-9921');
    const r = await integrity(file);
    expect(r.code).toBe(1);
    expect(r.text).toMatch(
      /audit entry \d+ \(change-state meter TW-02 at [^)]+\) its content no longer matches its hash/,
    );
    expect(r.text).toMatch(/affects: the trail of meter TW-02, and the entries after it \(1 later entry\)/);
  });

  it('finds a record changed by SQL with the triggers removed, and a signature moved to another record', async () => {
    const { file } = await signedLab();
    const lab = openApi(file, { clock });
    await lab.api.recordCheck(goodCheck({ date: '2026-11-25' }));
    lab.close();
    const db = new Database(file);
    db.exec('DROP TRIGGER reading_locked_update');
    db.prepare(
      'UPDATE reading SET value = value + 1000 WHERE point_id = (SELECT min(id) FROM check_point)',
    ).run();
    // 11.70: the performer's signature of check 1 copied onto check 2 must not verify there.
    db.prepare(
      `INSERT INTO check_signature (revision_id, seq, person_id, key_id, printed_name, role, meaning, signed_at,
         payload_sha256, signature_b64)
       SELECT 2, seq, person_id, key_id, printed_name, role, meaning, signed_at, payload_sha256, signature_b64
       FROM check_signature WHERE revision_id = 1 AND seq = 1`,
    ).run();
    db.close();
    const r = await integrity(file);
    expect(r.code).toBe(1);
    expect(r.text).toMatch(/check 1 revision 1: the performed signature .* does not match the record/);
    expect(r.text).toMatch(/check 2 revision 1: the performed signature .* does not match the record/);
    expect(r.text).toMatch(/check 2 revision 1 is signed but marked as an editable draft/);
  });
});

describe('dipledger backup', () => {
  it('copies a consistent state while another connection holds an open write, and restores as documented', async () => {
    const { dir, file } = await signedLab();
    // Another process mid-write: its uncommitted row must not reach the copy.
    const writer = new Database(file);
    writer.pragma('busy_timeout = 5000');
    writer.exec('BEGIN IMMEDIATE');
    writer
      .prepare("INSERT INTO person (name, role, created_at) VALUES ('Uncommitted Person', 'technician', 't')")
      .run();
    const o = io(dir);
    expect(await runCli(['--db', file, 'backup', 'copy.dipledger'], o)).toBe(0);
    expect(o.stdout.join('\n')).toMatch(/the copy passes SQLite's integrity check/);
    writer.exec('COMMIT');
    writer.close();
    const copy = path.join(dir, 'copy.dipledger');
    expect(await runCli(['--db', file, 'backup', 'copy.dipledger'], io(dir))).toBe(2);

    // Later work, then damage: the restore brings back the state of the backup.
    const lab = openApi(file, { clock });
    await lab.api.recordCheck(goodCheck({ date: '2026-11-26' }));
    lab.close();
    editByte(file, 'remark-ZQX-4417');
    expect((await integrity(file)).code).toBe(1);

    // Restore, as README "Backups and restoring" says: check the copy, set the damaged file
    // aside with its -wal and -shm, copy the backup into place.
    expect((await integrity(copy)).code).toBe(0);
    for (const ext of ['', '-wal', '-shm'])
      if (existsSync(file + ext)) copyFileSync(file + ext, `${file}.damaged${ext}`);
    for (const ext of ['-wal', '-shm']) rmSync(file + ext, { force: true });
    copyFileSync(copy, file);
    const back = await integrity(file);
    expect(back.code).toBe(0);
    const restored = openApi(file, { clock });
    const people = (await restored.api.listPeople()).map((p) => p.name);
    expect(people).not.toContain('Uncommitted Person');
    expect((await restored.api.getMeter('TW-01')).checks.map((c) => c.checkId)).toEqual([1]);
    expect((await restored.api.getCheckRevision({ checkId: 1 })).signatures).toHaveLength(2);
    restored.close();
  });
});
