/**
 * The tests Stryker runs against each mutant (`npm run mutate`): the unit and reference tests of
 * the browser-safe core and of the pipeline's atomic/archive code. Pipeline, site and browser
 * tests spawn whole builds or a browser and are left out: per mutant they would cost minutes.
 */
import { defineConfig } from 'vitest/config';

/** Everything the mutation run may use (the whole core). */
const ALL = [
  'tests/fits/**/*.test.ts',
  'tests/ogip/**/*.test.ts',
  'tests/physics/**/*.test.ts',
  'tests/response/**/*.test.ts',
  'tests/fit/**/*.test.ts',
  'tests/checks/**/*.test.ts',
  'tests/compare/**/*.test.ts',
  'tests/numeric/**/*.test.ts',
  'tests/spectrum/**/*.test.ts',
  'tests/atomic/**/*.test.ts',
];

/**
 * A folder's own tests, for `npm run mutate -- FOLDER`. Nearly every test imports fits/ and
 * numeric/, so "related" tests alone made a folder run of fits/ take hours (each mutant ran the
 * physics and reference suites); a folder is scored by the tests written for it, plus the suites
 * that exercise it directly (the OGIP writers for FITS, the seal tests for the archive).
 */
const OWN: Record<string, string[]> = {
  'generators/fits': ['tests/fits/**/*.test.ts', 'tests/ogip/**/*.test.ts'],
  'generators/fit': ['tests/fit/**/*.test.ts', 'tests/model/transfer-loss.test.ts'],
  'generators/pipeline/atomic.ts': ['tests/atomic/**/*.test.ts'],
  'generators/pipeline/archive.ts': ['tests/pipeline/seal.test.ts'],
};
const ownTests = (part: string) => OWN[part] ?? [`${part.replace(/^generators\//, 'tests/')}/**/*.test.ts`];
const parts = (process.env.KILN_MUTATE ?? '').split(',').filter(Boolean);

export default defineConfig({
  test: {
    include: parts.length ? [...new Set(parts.flatMap(ownTests))] : ALL,
    // Hang guard only (as in vitest.config.ts): CLI tests run a demo build and take minutes on loaded cores.
    testTimeout: 300_000,
    hookTimeout: 300_000,
    pool: 'forks',
  },
});
