// Electron main process: one window on the built renderer, the LabApi behind one IPC channel.
// Receives the electron module from the Electron entry (dist/desktop.cjs); holds no domain logic.
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import type * as Electron from 'electron';
import { openApi } from '../api/open';
import { createLabFile } from '../../sample-lab/load';
import { isOwnPage, registerLabApi } from './ipc';
import { ensureLabFile, labFilePath } from './startup';

const here = path.dirname(fileURLToPath(import.meta.url));
const rendererDir = path.resolve(here, '..', '..', 'renderer', 'dist');

export async function startDesktop(electron: typeof Electron): Promise<void> {
  const { app, BrowserWindow, ipcMain, session, Menu } = electron;

  // Two windows on one lab file would only confuse who recorded what; focus the first.
  if (!app.requestSingleInstanceLock()) {
    app.quit();
    return;
  }

  const file = labFilePath(process.env, process.platform, os.homedir());
  await ensureLabFile(file, createLabFile);
  const lab = openApi(file);
  const rendererUrl = pathToFileURL(rendererDir).href;
  const unregister = registerLabApi(ipcMain, lab.api, (event) =>
    isOwnPage(event.senderFrame?.url, rendererUrl),
  );

  app.on('will-quit', () => {
    unregister();
    lab.close();
  });
  app.on('window-all-closed', () => app.quit());

  await app.whenReady();
  // The renderer needs no camera, location or notifications: refuse every permission.
  session.defaultSession.setPermissionRequestHandler((_wc, _permission, callback) => callback(false));
  Menu.setApplicationMenu(
    Menu.buildFromTemplate([
      { role: process.platform === 'darwin' ? 'appMenu' : 'fileMenu' },
      { role: 'editMenu' },
      { role: 'viewMenu' },
    ]),
  );

  const win = new BrowserWindow({
    width: 1200,
    height: 800,
    title: 'Dipledger',
    show: false,
    webPreferences: {
      preload: path.join(here, 'preload.cjs'),
      contextIsolation: true,
      nodeIntegration: false,
      sandbox: true,
    },
  });
  // The window shows our page only: no pop-ups, no navigation away from it.
  win.webContents.setWindowOpenHandler(() => ({ action: 'deny' }));
  win.webContents.on('will-navigate', (event) => event.preventDefault());
  win.once('ready-to-show', () => win.show());
  app.on('second-instance', () => {
    if (win.isMinimized()) win.restore();
    win.focus();
  });
  await win.loadFile(path.join(rendererDir, 'index.html'));
}
