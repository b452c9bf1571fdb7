// The Electron entry (dist/desktop.cjs -> the compiled main process) under plain Node with a fake electron module:
// a secure window on the built page, and the lab reachable only from that page over IPC.
import { execFile } from 'node:child_process';
import { mkdtemp, rm } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { promisify } from 'node:util';
import { afterAll, describe, expect, it } from 'vitest';

const repoRoot = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
let dir: string | undefined;
afterAll(async () => {
  if (dir) await rm(dir, { recursive: true, force: true });
});

describe('desktop main process (fake electron)', () => {
  it('opens the lab, one sandboxed window, and answers its own page only', async () => {
    dir = await mkdtemp(path.join(os.tmpdir(), 'dipledger-main-'));
    const { stdout } = await promisify(execFile)(
      process.execPath,
      ['--import', 'tsx', path.join(repoRoot, 'test', 'e2e', 'fixtures', 'run-desktop-main.ts')],
      {
        cwd: repoRoot,
        env: { ...process.env, DIPLEDGER_DB: path.join(dir, 'lab.dipledger') },
        timeout: 60_000,
      },
    );
    const report = JSON.parse(stdout.trim().split('\n').at(-1) ?? '{}') as {
      windows: { preload: string; contextIsolation: boolean; nodeIntegration: boolean; sandbox: boolean }[];
      loaded: string;
      ownPage: { ok: boolean; value?: unknown[] };
      otherPage: { ok: boolean; error?: { code: string } };
    };
    expect(report.windows).toEqual([
      {
        preload: path.join(repoRoot, 'app', 'desktop', 'preload.cjs'),
        contextIsolation: true,
        nodeIntegration: false,
        sandbox: true,
      },
    ]);
    expect(report.loaded).toBe(path.join(repoRoot, 'renderer', 'dist', 'index.html'));
    expect(report.ownPage.ok).toBe(true);
    expect(report.ownPage.value?.length).toBeGreaterThan(0);
    expect(report.otherPage).toMatchObject({ ok: false, error: { code: 'refused' } });
  }, 90_000);
});
