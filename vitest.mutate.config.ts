/**
 * The tests Stryker runs against each mutant (`npm run mutate`): the unit and reference tests of
 * the browser-safe core and of the pipeline's atomic/archive code. Pipeline, site and browser
 * tests spawn whole builds or a browser and are left out: per mutant they would cost minutes.
 */
import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: [
      'tests/fits/**/*.test.ts',
      'tests/ogip/**/*.test.ts',
      'tests/physics/**/*.test.ts',
      'tests/response/**/*.test.ts',
      'tests/fit/**/*.test.ts',
      'tests/checks/**/*.test.ts',
      'tests/compare/**/*.test.ts',
      'tests/engine/**/*.test.ts',
      'tests/numeric/**/*.test.ts',
      'tests/spectrum/**/*.test.ts',
      'tests/atomic/**/*.test.ts',
    ],
    // Hang guard only (as in vitest.config.ts): CLI tests run a demo build and take minutes on loaded cores.
    testTimeout: 300_000,
    hookTimeout: 300_000,
    pool: 'forks',
  },
});
