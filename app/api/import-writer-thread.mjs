// Entry of the import's writer thread: a worker starts with no TypeScript loader (it does not
// inherit one registered in its parent's code, as the desktop's main.cjs does), so it registers
// tsx itself before loading the thread's TypeScript.
import { register } from 'tsx/esm/api';

register();
await import('./import-writer-thread.ts');
