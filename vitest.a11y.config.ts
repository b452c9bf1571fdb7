// The accessibility tests (axe-core and keyboard, in Chromium): `npm run test:a11y`, kept out
// of `npm test` so the main run stays quick.
import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['test/a11y/**/*.test.ts'],
    testTimeout: 120000,
    hookTimeout: 300000,
    pool: 'forks',
    fileParallelism: false,
    setupFiles: ['test/setup.ts'],
    globalSetup: ['test/global-build.ts'],
  },
});
