// Electron entry (package.json "main"): loads the TypeScript main process through tsx, then
// hands it the electron module, so main.ts never requires electron itself.
'use strict';
const electron = require('electron');

import('tsx/esm/api')
  .then(({ register }) => {
    register();
    return import('./main.ts');
  })
  .then((main) => main.startDesktop(electron))
  .catch((e) => {
    console.error('Dipledger could not start its desktop window:', e);
    electron.app.exit(1);
  });
