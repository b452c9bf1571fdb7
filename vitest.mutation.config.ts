// Vitest settings for mutation runs (npm run test:mutation): the pure engine and reference tests
// that reach the mutated modules (budget, conformity, correction, refractivity, intervals, drift,
// evaluate). The rest of the suite touches the database, documents and shells and would only slow
// every mutant down.
import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['test/engine/**/*.test.ts', 'test/reference/**/*.test.ts'],
    exclude: [
      'node_modules/**',
      // These import none of the mutated modules (charts, dial charts, waveguides, the dip fit,
      // quantities), so they cannot kill a mutant; left out only to save time. resonance.test.ts
      // also reads its NPL trace from outside the project.
      'test/engine/chart.test.ts',
      'test/engine/dialchart.test.ts',
      'test/engine/dipplot.test.ts',
      'test/engine/lsq-*.test.ts',
      'test/engine/quantity*.test.ts',
      'test/engine/resonance*.test.ts',
      'test/reference/resonance.test.ts',
      'test/reference/waveguide.test.ts',
    ],
    testTimeout: 30000,
    hookTimeout: 60000,
    pool: 'forks',
    setupFiles: ['test/setup.ts', 'test/setup-mutation.ts'],
    // One worker keeps the engine modules loaded from one mutant's run to the next (the mutants are
    // switched at run time); far faster on two shared cores.
    isolate: false,
  },
});
