// Tests that run the shipped entries (bin/dipledger.mjs, dist/desktop.cjs) run the compiled
// JavaScript: build it once before the tests start, as `npm install` does.
import { execFileSync } from 'node:child_process';

export default function setup(): void {
  execFileSync(process.execPath, ['scripts/build.mjs'], { stdio: 'inherit' });
}
