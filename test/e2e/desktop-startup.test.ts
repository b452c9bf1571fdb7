// Start-up rules of `npm start`: where the user's lab file lives on each platform, creating
// it once from the demo lab, and telling why no desktop window is used.
import { existsSync } from 'node:fs';
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { ensureLabFile, findElectron, labFilePath, preferredPort } from '../../app/desktop/startup';

const dirs: string[] = [];
afterAll(async () => {
  for (const d of dirs) await rm(d, { recursive: true, force: true });
});

describe('labFilePath', () => {
  it('follows each platform’s per-user data folder', () => {
    expect(labFilePath({}, 'linux', '/home/ada')).toBe('/home/ada/.local/share/dipledger/lab.dipledger');
    expect(labFilePath({ XDG_DATA_HOME: '/data/ada' }, 'linux', '/home/ada')).toBe(
      '/data/ada/dipledger/lab.dipledger',
    );
    expect(labFilePath({ XDG_DATA_HOME: 'relative/ignored' }, 'linux', '/home/ada')).toBe(
      '/home/ada/.local/share/dipledger/lab.dipledger',
    );
    expect(labFilePath({}, 'darwin', '/Users/ada')).toBe(
      '/Users/ada/Library/Application Support/Dipledger/lab.dipledger',
    );
    expect(labFilePath({ APPDATA: 'C:\\Users\\ada\\AppData\\Roaming' }, 'win32', 'C:\\Users\\ada')).toBe(
      'C:\\Users\\ada\\AppData\\Roaming\\Dipledger\\lab.dipledger',
    );
  });

  it('lets DIPLEDGER_DB override everything', () => {
    expect(
      labFilePath({ DIPLEDGER_DB: '/tmp/x/my.dipledger', XDG_DATA_HOME: '/data' }, 'linux', '/home/ada'),
    ).toBe('/tmp/x/my.dipledger');
  });
});

describe('ensureLabFile', () => {
  it('creates a missing file once, with the demo lab, and leaves an existing one alone', async () => {
    const dir = await mkdtemp(path.join(os.tmpdir(), 'dipledger-start-'));
    dirs.push(dir);
    const file = path.join(dir, 'nested', 'folder', 'lab.dipledger');
    const calls: [string, boolean][] = [];
    const create = async (f: string, withSample: boolean) => {
      calls.push([f, withSample]);
      await writeFile(f, 'lab');
    };
    expect(await ensureLabFile(file, create)).toBe(true);
    expect(existsSync(file)).toBe(true);
    expect(await ensureLabFile(file, create)).toBe(false);
    expect(calls).toEqual([[file, true]]);
  });
});

describe('findElectron', () => {
  it('says why there is no desktop window when the binary is absent', async () => {
    const dir = await mkdtemp(path.join(os.tmpdir(), 'dipledger-noelectron-'));
    dirs.push(dir);
    const check = findElectron(dir);
    expect(check.ok).toBe(false);
    if (!check.ok) expect(check.reason).toMatch(/Electron/);
  });
});

describe('preferredPort', () => {
  it('takes DIPLEDGER_PORT when valid, else 5317', () => {
    expect(preferredPort({})).toBe(5317);
    expect(preferredPort({ DIPLEDGER_PORT: '8123' })).toBe(8123);
    expect(preferredPort({ DIPLEDGER_PORT: 'abc' })).toBe(5317);
    expect(preferredPort({ DIPLEDGER_PORT: '70000' })).toBe(5317);
  });
});
