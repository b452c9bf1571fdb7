import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['test/**/*.test.ts', 'test/**/*.test.tsx'],
    exclude: ['test/bench/**', 'test/a11y/**', 'node_modules/**'],
    testTimeout: 30000,
    hookTimeout: 60000,
    pool: 'forks',
    setupFiles: ['test/setup.ts'],
    globalSetup: ['test/global-build.ts'],
  },
});
