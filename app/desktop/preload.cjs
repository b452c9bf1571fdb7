// Desktop preload: gives the page one function, window.dipledger.call(op, args), over the
// single 'labapi' IPC channel. Plain CommonJS because a sandboxed preload cannot load TypeScript.
'use strict';
const { contextBridge, ipcRenderer } = require('electron');

contextBridge.exposeInMainWorld('dipledger', {
  // Only strings and arrays cross; the main process validates everything again.
  call: (op, args) => ipcRenderer.invoke('labapi', String(op), Array.isArray(args) ? args : []),
});
