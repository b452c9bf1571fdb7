// Entry of the import's writer thread when the service runs from its TypeScript sources (the
// tests, through vitest): a worker inherits no loader, so it registers tsx (a development
// dependency) itself. The shipped program starts dist/import-writer-thread.mjs instead, the
// compiled thread beside the compiled service (scripts/build.mjs).
import { register } from 'tsx/esm/api';

register();
await import('./import-writer-thread.ts');
