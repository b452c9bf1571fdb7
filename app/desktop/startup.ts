// Start-up decisions shared by `npm start` and the Electron main process: where the user's lab
// file lives, creating it on first run, and whether a desktop window can be used here.
import { existsSync, readFileSync } from 'node:fs';
import { mkdir } from 'node:fs/promises';
import path from 'node:path';

export { LAB_FILE_NAME, labFilePath } from '../../db/lab-file';

/** Creates the lab file (with the demo lab) when it does not exist yet. Returns whether it did. */
export async function ensureLabFile(
  file: string,
  createLabFile: (file: string, withSample: boolean) => Promise<void>,
): Promise<boolean> {
  if (existsSync(file)) return false;
  await mkdir(path.dirname(file), { recursive: true });
  await createLabFile(file, true);
  return true;
}

export type DesktopCheck = { ok: true; binary: string } | { ok: false; reason: string };

/** Whether Electron's binary is installed (its postinstall download may have been skipped). */
export function findElectron(repoRoot: string): DesktopCheck {
  const pkg = path.join(repoRoot, 'node_modules', 'electron');
  if (!existsSync(pkg))
    return { ok: false, reason: 'Electron is not installed (node_modules/electron is missing).' };
  const pathFile = path.join(pkg, 'path.txt');
  if (!existsSync(pathFile)) {
    return {
      ok: false,
      reason:
        'the Electron binary was not downloaded (run "node node_modules/electron/install.js" with network access, ' +
        'then rebuild better-sqlite3 for Electron, to get the desktop window).',
    };
  }
  const binary = path.join(pkg, 'dist', readFileSync(pathFile, 'utf8').trim());
  if (!existsSync(binary)) return { ok: false, reason: `the Electron binary is missing at ${binary}.` };
  return { ok: true, binary };
}

/** The port to try first: DIPLEDGER_PORT if it is a valid port number, else 5317. */
export function preferredPort(env: NodeJS.ProcessEnv): number {
  const n = Number(env.DIPLEDGER_PORT);
  return Number.isInteger(n) && n > 0 && n < 65536 ? n : 5317;
}
