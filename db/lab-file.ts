// Where the user's lab file lives, the same for the desktop window, `npm start` and the CLI.
import path from 'node:path';

export const LAB_FILE_NAME = 'lab.dipledger';

/** The user's lab file: DIPLEDGER_DB if set, else the platform's per-user data folder. */
export function labFilePath(env: NodeJS.ProcessEnv, platform: NodeJS.Platform, home: string): string {
  if (env.DIPLEDGER_DB) return path.resolve(env.DIPLEDGER_DB);
  // Build with the target platform's separators, so the rule is testable on any machine.
  const p = platform === 'win32' ? path.win32 : path.posix;
  if (platform === 'win32') {
    const appData = env.APPDATA || p.join(home, 'AppData', 'Roaming');
    return p.join(appData, 'Dipledger', LAB_FILE_NAME);
  }
  if (platform === 'darwin')
    return p.join(home, 'Library', 'Application Support', 'Dipledger', LAB_FILE_NAME);
  // XDG Base Directory: a relative XDG_DATA_HOME is invalid and must be ignored.
  const xdg =
    env.XDG_DATA_HOME && p.isAbsolute(env.XDG_DATA_HOME)
      ? env.XDG_DATA_HOME
      : p.join(home, '.local', 'share');
  return p.join(xdg, 'dipledger', LAB_FILE_NAME);
}
