#!/usr/bin/env node
// Entry point of the `dipledger` command: runs the compiled CLI (dist/cli.mjs, made by
// `npm run build`, which `npm install` runs through "prepare").
const { runCli, processIo } = await import('../dist/cli.mjs');
process.exitCode = await runCli(process.argv.slice(2), processIo());
