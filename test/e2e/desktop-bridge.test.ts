// The desktop IPC bridge without Electron: the real preload.cjs and registerLabApi, joined by
// a fake ipcMain/ipcRenderer pair that structured-clones like Electron does.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import type { IpcMainInvokeEvent } from 'electron';
import { ipcClient } from '../../app/api/client';
import type { DesktopBridge } from '../../app/api/client';
import type { Envelope } from '../../app/api/transport';
import { LABAPI_CHANNEL, isOwnPage, registerLabApi } from '../../app/desktop/ipc';
import type { IpcMainLike } from '../../app/desktop/ipc';
import { DEMO_LAB, DEMO_ROWS, fakeLabApi } from './fixtures/fakeLab';

type Handler = (event: IpcMainInvokeEvent, ...args: unknown[]) => unknown;

function fakeElectron(frameUrl = 'file:///opt/dipledger/renderer/dist/index.html') {
  const handlers = new Map<string, Handler>();
  const ipcMain: IpcMainLike = {
    handle: (channel: string, listener: Handler) => {
      if (handlers.has(channel)) throw new Error(`second handler for ${channel}`);
      handlers.set(channel, listener);
    },
    removeHandler: (channel: string) => void handlers.delete(channel),
  };
  const channels: string[] = [];
  const ipcRenderer = {
    invoke: async (channel: string, ...args: unknown[]) => {
      channels.push(channel);
      const handler = handlers.get(channel);
      if (!handler) throw new Error(`No handler registered for '${channel}'`);
      const event = { senderFrame: { url: frameUrl } } as unknown as IpcMainInvokeEvent;
      return structuredClone(await handler(event, ...structuredClone(args)));
    },
  };
  const exposed: Record<string, unknown> = {};
  const contextBridge = { exposeInMainWorld: (key: string, api: unknown) => void (exposed[key] = api) };
  return { ipcMain, ipcRenderer, contextBridge, exposed, handlers, channels };
}

/** Runs the shipped preload.cjs with `require('electron')` answered by the fake. */
function runPreload(fake: ReturnType<typeof fakeElectron>): DesktopBridge {
  const file = path.join(
    path.dirname(fileURLToPath(import.meta.url)),
    '..',
    '..',
    'app',
    'desktop',
    'preload.cjs',
  );
  const fakeRequire = (name: string) => {
    if (name !== 'electron') throw new Error(`preload may require only electron, not ${name}`);
    return { contextBridge: fake.contextBridge, ipcRenderer: fake.ipcRenderer };
  };
  // eslint-disable-next-line @typescript-eslint/no-implied-eval -- evaluating our own preload file under a fake require
  const run = new Function('require', 'module', 'exports', readFileSync(file, 'utf8')) as (
    r: typeof fakeRequire,
    m: unknown,
    e: unknown,
  ) => void;
  run(fakeRequire, { exports: {} }, {});
  expect(Object.keys(fake.exposed)).toEqual(['dipledger']);
  return fake.exposed.dipledger as DesktopBridge;
}

describe('desktop IPC bridge', () => {
  it('carries operations over the one channel and round-trips values and errors', async () => {
    const fake = fakeElectron();
    registerLabApi(fake.ipcMain, fakeLabApi());
    const api = ipcClient(runPreload(fake));
    expect(await api.getLab()).toEqual(DEMO_LAB);
    expect(await api.listMeters()).toEqual(DEMO_ROWS);
    await expect(api.getMeter('WM-404')).rejects.toMatchObject({ name: 'LabError', code: 'not-found' });
    expect(new Set(fake.channels)).toEqual(new Set([LABAPI_CHANNEL]));
    expect([...fake.handlers.keys()]).toEqual([LABAPI_CHANNEL]);
  });

  it('refuses unknown operations and junk arguments from the page', async () => {
    const fake = fakeElectron();
    registerLabApi(fake.ipcMain, fakeLabApi());
    const bridge = runPreload(fake);
    expect(await bridge.call('dropAll', [])).toMatchObject({ ok: false, error: { code: 'invalid-input' } });
    // The preload turns a non-array into [], so the method sees no arguments.
    const env = (await bridge.call('listMeters', 'junk' as unknown as unknown[])) as Envelope;
    expect(env.ok).toBe(true);
  });

  it('answers frames that are not our page with a refusal', async () => {
    const fake = fakeElectron('https://evil.example/');
    registerLabApi(fake.ipcMain, fakeLabApi(), (e) =>
      isOwnPage(e.senderFrame?.url, 'file:///opt/dipledger/renderer/dist'),
    );
    await expect(ipcClient(runPreload(fake)).listMeters()).rejects.toMatchObject({ code: 'refused' });
  });

  it('unregisters its handler', () => {
    const fake = fakeElectron();
    const off = registerLabApi(fake.ipcMain, fakeLabApi());
    off();
    expect(fake.handlers.size).toBe(0);
  });

  it('recognises its own page only', () => {
    const dir = 'file:///opt/dipledger/renderer/dist';
    expect(isOwnPage(`${dir}/index.html`, dir)).toBe(true);
    expect(isOwnPage(`${dir}/index.html#x`, dir)).toBe(true);
    expect(isOwnPage('file:///opt/dipledger/renderer/dist-evil/index.html', dir)).toBe(false);
    expect(isOwnPage('file:///opt/dipledger/renderer/dist/../../secret.html', dir)).toBe(false);
    expect(isOwnPage('https://evil.example/opt/dipledger/renderer/dist/index.html', dir)).toBe(false);
    expect(isOwnPage('file://host/opt/dipledger/renderer/dist/index.html', dir)).toBe(false);
    expect(isOwnPage(undefined, dir)).toBe(false);
  });
});
