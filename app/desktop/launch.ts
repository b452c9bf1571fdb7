// What `npm start` runs after building the renderer: opens (or first creates) the user's lab
// file, then shows it in the desktop window, or in the browser over 127.0.0.1 when it cannot.
import { spawn } from 'node:child_process';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { openApi } from '../api/open';
import { startServer } from '../server/server';
import type { RunningServer } from '../server/server';
import type { LabApi } from '../api/contract';
import { createLabFile } from '../../sample-lab/load';
import { ensureLabFile, findElectron, labFilePath, preferredPort } from './startup';

const repoRoot = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');

async function main(): Promise<void> {
  const file = labFilePath(process.env, process.platform, os.homedir());
  if (await ensureLabFile(file, createLabFile))
    console.log(`Created your lab file with the demo lab: ${file}`);
  else console.log(`Lab file: ${file}`);

  let why: string;
  const electron = findElectron(repoRoot);
  if (process.argv.includes('--browser')) {
    why = 'Browser mode was asked for (--browser).';
  } else if (!electron.ok) {
    why = `No desktop window: ${electron.reason}`;
  } else {
    const code = await runElectron(electron.binary, file);
    if (code === 0) return;
    why = `No desktop window: Electron stopped with exit code ${code} (better-sqlite3 may need rebuilding for Electron).`;
  }
  await browserMode(file, why);
}

function runElectron(binary: string, file: string): Promise<number> {
  return new Promise((resolve) => {
    const child = spawn(binary, [repoRoot], {
      stdio: 'inherit',
      env: { ...process.env, DIPLEDGER_DB: file },
    });
    child.on('error', () => resolve(-1));
    child.on('exit', (code) => resolve(code ?? -1));
  });
}

async function browserMode(file: string, why: string): Promise<void> {
  const lab = openApi(file);
  const server = await listen(lab.api, preferredPort(process.env));
  console.log(`Dipledger (browser mode): ${server.launchUrl}`);
  console.log(why);

  let closing = false;
  const stop = (): void => {
    if (closing) return;
    closing = true;
    // Close the server first so no request is half-way when the database closes.
    server
      .close()
      .catch(() => undefined)
      .finally(() => {
        lab.close();
        process.exit(0);
      });
  };
  process.on('SIGINT', stop);
  process.on('SIGTERM', stop);
}

/** The preferred port, or any free one when it is taken. */
async function listen(api: LabApi, port: number): Promise<RunningServer> {
  const staticDir = path.join(repoRoot, 'renderer', 'dist');
  try {
    return await startServer({ api, port, staticDir });
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    if (code !== 'EADDRINUSE' && code !== 'EACCES') throw e;
    console.log(`Port ${port} is in use; using a free port instead.`);
    return startServer({ api, port: 0, staticDir });
  }
}

main().catch((e: unknown) => {
  console.error('Dipledger could not start:', e instanceof Error ? e.message : e);
  process.exit(1);
});
