// The desktop IPC bridge: one channel carries every LabApi operation, with the operation
// name as data. Takes ipcMain as a parameter so it runs under plain Node against a fake.
import type { IpcMain, IpcMainInvokeEvent } from 'electron';
import type { LabApi } from '../api/contract';
import { dispatch } from '../api/transport';
import type { Envelope } from '../api/transport';

/** Also hard-coded in preload.cjs (a preload cannot import TypeScript); a test keeps them equal. */
export const LABAPI_CHANNEL = 'labapi';

export type IpcMainLike = Pick<IpcMain, 'handle' | 'removeHandler'>;

/** Answers `ipcRenderer.invoke('labapi', op, args)` with an envelope; returns an unregister function.
 * `trusted` decides which frames may talk to the lab (only our own page, in the app). */
export function registerLabApi(
  ipcMain: IpcMainLike,
  api: LabApi,
  trusted: (event: IpcMainInvokeEvent) => boolean = () => true,
): () => void {
  ipcMain.handle(
    LABAPI_CHANNEL,
    async (event: IpcMainInvokeEvent, op: unknown, args: unknown): Promise<Envelope> => {
      if (!trusted(event)) {
        return {
          ok: false,
          error: { code: 'refused', message: 'this page may not use the lab service', issues: [] },
        };
      }
      return dispatch(api, op, args);
    },
  );
  return () => ipcMain.removeHandler(LABAPI_CHANNEL);
}

/** A frame is ours when it shows a file from the renderer's build folder. */
export function isOwnPage(url: string | undefined, rendererDirUrl: string): boolean {
  if (!url) return false;
  const base = rendererDirUrl.endsWith('/') ? rendererDirUrl : `${rendererDirUrl}/`;
  try {
    const u = new URL(url);
    return u.protocol === 'file:' && u.host === '' && `file://${u.pathname}`.startsWith(base);
  } catch {
    return false;
  }
}
