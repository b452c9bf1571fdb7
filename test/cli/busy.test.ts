// A lab file whose write lock another writer holds longer than a write waits: the CLI refuses with
// a clear message and its own exit code (4), the server answers HTTP 503 with the same message and
// keeps answering meanwhile (health and reads), and nothing is written. Also `dipledger anchor`.
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import Database from 'better-sqlite3';
import { afterEach, describe, expect, it } from 'vitest';
import { BUSY_MESSAGE } from '../../app/api/busy';
import { openApi } from '../../app/api/open';
import { runCli, type CliIo } from '../../app/cli/main';
import { startServer } from '../../app/server/server';
import { clock, seededLab } from '../fixtures/lab';

const TOKEN = 'busy-test-token-0123456789abcdef';

function io(cwd: string): CliIo & { stdout: string[]; stderr: string[] } {
  const stdout: string[] = [];
  const stderr: string[] = [];
  return { stdout, stderr, out: (t) => stdout.push(t), err: (t) => stderr.push(t), env: {}, cwd, clock };
}

async function labFile(): Promise<{ dir: string; file: string }> {
  const dir = mkdtempSync(path.join(tmpdir(), 'dipledger-busy-'));
  const file = path.join(dir, 'lab.dipledger');
  (await seededLab(file)).close();
  return { dir, file };
}

const cleanups: (() => unknown)[] = [];
afterEach(async () => {
  while (cleanups.length) await cleanups.pop()?.();
});

/** Another writer: holds the file's write lock until released. */
function holdLock(file: string): Database.Database {
  const other = new Database(file);
  other.exec('BEGIN IMMEDIATE');
  other.prepare("UPDATE meter SET location = 'held' WHERE asset_id = 'TW-02'").run();
  cleanups.push(() => other.open && other.close());
  return other;
}

const stateOf = (file: string) => {
  const db = new Database(file, { readonly: true });
  const row = db.prepare("SELECT state FROM meter WHERE asset_id = 'TW-01'").get() as { state: string };
  const audit = db.prepare('SELECT count(*) AS n FROM audit_entry').get() as { n: number };
  db.close();
  return { state: row.state, audit: audit.n };
};

describe('a busy lab file', () => {
  it('the CLI refuses with exit 4 and a clear message, and writes nothing', async () => {
    const { dir, file } = await labFile();
    const before = stateOf(file);
    holdLock(file);
    const o = io(dir);
    const started = Date.now();
    const code = await runCli(['--db', file, 'quarantine', 'TW-01', '--reason', 'dial slips'], o);
    expect(code).toBe(4);
    expect(o.stderr.join('\n')).toContain(BUSY_MESSAGE);
    expect(o.stderr.join('\n')).not.toMatch(/at .*\.ts:\d+|internal error/);
    expect(Date.now() - started).toBeGreaterThanOrEqual(4000);
    expect(stateOf(file)).toEqual(before);
  });

  it('a write waiting for the lock goes through once the other writer is done', async () => {
    const { dir, file } = await labFile();
    const other = holdLock(file);
    setTimeout(() => other.exec('ROLLBACK'), 600);
    const o = io(dir);
    expect(await runCli(['--db', file, 'quarantine', 'TW-01', '--reason', 'dial slips'], o)).toBe(0);
    expect(stateOf(file).state).toBe('quarantined');
  });

  it('the server answers 503 with the same message and keeps answering health and reads meanwhile', async () => {
    const { file } = await labFile();
    const lab = openApi(file, { clock });
    cleanups.push(() => lab.close());
    const server = await startServer({ api: lab.api, token: TOKEN });
    cleanups.push(() => server.close());
    const post = (op: string, args: unknown[]) =>
      fetch(`${server.url}api/${op}`, {
        method: 'POST',
        headers: { 'content-type': 'application/json', 'x-dipledger-token': TOKEN },
        body: JSON.stringify({ args }),
      });
    holdLock(file);
    const started = Date.now();
    const write = post('changeMeterState', [
      { assetId: 'TW-01', state: 'quarantined', reason: 'dial slips' },
    ]);
    // While the write waits, health and a read are answered promptly.
    await new Promise((resolve) => setTimeout(resolve, 300));
    const t0 = Date.now();
    const health = await fetch(`${server.url}api/health`);
    expect(health.status).toBe(200);
    const read = await post('listMeters', []);
    expect(read.status).toBe(200);
    expect(Date.now() - t0).toBeLessThan(1500);
    const res = await write;
    expect(res.status).toBe(503);
    const body = (await res.json()) as { ok: boolean; error: { code: string; message: string } };
    expect(body.ok).toBe(false);
    expect(body.error).toMatchObject({ code: 'busy', message: BUSY_MESSAGE });
    expect(Date.now() - started).toBeGreaterThanOrEqual(4000);
    expect(stateOf(file).state).toBe('in-service');
  });
});

describe('dipledger anchor', () => {
  it('prints the head of the audit trail, the one integrity reports', async () => {
    const { dir, file } = await labFile();
    const o = io(dir);
    expect(await runCli(['--db', file, '--json', 'anchor'], o)).toBe(0);
    const printed = JSON.parse(o.stdout.join('\n')) as { auditHead: string; entryId: number };
    const lab = openApi(file, { clock });
    const report = await lab.api.verifyIntegrity();
    lab.close();
    expect(printed.auditHead).toBe(report.auditHead);
    expect(printed.auditHead).toMatch(/^[0-9a-f]{64}$/);
    expect(printed.entryId).toBe(report.auditEntries);
  });
});
