// Two processes writing one lab file at once: the running app (one long-lived connection,
// writing through the API) and the command line (a connection per command). No write may be
// lost, no "database is locked" may escape, and the audit chain must not fork.
import { spawn } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { openApi } from '../../app/api/open';
import { integrityReport as verifyIntegrity } from '../../app/api/ops/audit';
import { openLabDb } from '../../db/store';
import { clock, seed } from '../fixtures/lab';
import { sized } from '../fixtures/test-level';

const CHILD = path.join(path.dirname(new URL(import.meta.url).pathname), 'records-child.ts');

const WRITES = sized(40, 15);

function start(mode: 'app' | 'cli', file: string) {
  const child = spawn(process.execPath, ['--import', 'tsx', CHILD, mode, file, String(WRITES)], {
    stdio: ['pipe', 'pipe', 'pipe'],
  });
  let out = '';
  child.stdout.on('data', (d: Buffer) => (out += d.toString()));
  child.stderr.on('data', (d: Buffer) => (out += d.toString()));
  const ready = new Promise<void>((resolve) => {
    const poll = setInterval(() => {
      if (out.includes('ready')) {
        clearInterval(poll);
        resolve();
      }
    }, 10);
  });
  const done = new Promise<{ code: number | null; out: string }>((resolve) =>
    child.on('exit', (code) => resolve({ code, out })),
  );
  return { child, ready, done };
}

describe('the app and the command line writing at once', () => {
  it(`lose no write of ${WRITES} each and raise no "database is locked"`, async () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'dipledger-concurrent-'));
    const file = path.join(dir, 'lab.dipledger');
    const lab = openApi(file, { create: true, clock });
    await seed(lab.api);
    lab.close();

    const app = start('app', file);
    const cli = start('cli', file);
    await Promise.all([app.ready, cli.ready]);
    app.child.stdin.end('go\n');
    cli.child.stdin.end('go\n');
    const [a, c] = await Promise.all([app.done, cli.done]);
    expect(a.out).not.toMatch(/locked|busy|ERROR|FAILED/i);
    expect(c.out).not.toMatch(/locked|busy|ERROR|FAILED/i);
    expect([a.code, c.code]).toEqual([0, 0]);

    const db = openLabDb(file);
    const count = (sql: string) => (db.prepare(sql).get() as { n: number }).n;
    expect(count('SELECT count(*) AS n FROM check_event')).toBe(WRITES);
    expect(count("SELECT count(*) AS n FROM audit_entry WHERE action = 'record' AND actor = 'app'")).toBe(
      WRITES,
    );
    expect(count("SELECT count(*) AS n FROM audit_entry WHERE action = 'change-state'")).toBe(WRITES);
    // Each entry follows exactly one other: a fork would show as two entries sharing a parent.
    expect(
      count(
        'SELECT count(*) AS n FROM (SELECT prev_hash FROM audit_entry GROUP BY prev_hash HAVING count(*) > 1)',
      ),
    ).toBe(0);
    expect(verifyIntegrity(db).problems).toEqual([]);
    db.close();
  }, 120_000);
});
