// The renderer's only way to the lab: a client derived from the contract, over the desktop
// bridge when the preload provided one, else over HTTP to the server that served this page.
import type { LabApi } from '../../../app/api/contract';
import { httpClient, ipcClient } from '../../../app/api/client';
import type { DesktopBridge } from '../../../app/api/client';

declare global {
  interface Window {
    dipledger?: DesktopBridge;
  }
}

export function labClient(win: Window = window): LabApi {
  return win.dipledger ? ipcClient(win.dipledger) : httpClient('');
}
