#!/usr/bin/env node
// Entry point of the `dipledger` command: runs the TypeScript CLI through tsx.
import { register } from 'tsx/esm/api';
import { fileURLToPath } from 'node:url';

register();
const { runCli, processIo } = await import(fileURLToPath(new URL('../app/cli/main.ts', import.meta.url)));
process.exitCode = await runCli(process.argv.slice(2), processIo());
