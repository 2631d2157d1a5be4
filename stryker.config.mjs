// Mutation testing of the browser-safe core and the pipeline's atomic/archive code (`npm run mutate`,
// not part of CI). One folder at a time: `npm run mutate -- checks` (scripts/mutate.mjs sets
// KILN_MUTATE to the folders; results are then kept per folder for incremental reruns).
// The machine is shared, so one test process at a time (concurrency 1).
const CORE = [
  'generators/fits/**/*.ts',
  'generators/ogip/**/*.ts',
  'generators/physics/**/*.ts',
  'generators/response/**/*.ts',
  'generators/fit/**/*.ts',
  'generators/checks/**/*.ts',
  'generators/compare/**/*.ts',
  'generators/spectrum/**/*.ts',
  'generators/numeric/**/*.ts',
  'generators/pipeline/atomic.ts',
  'generators/pipeline/archive.ts',
];
/** Not mutated: re-export indexes, type-only files, the generated xraylib table (data, not logic). */
const NOT_MUTATED = ['!generators/**/index.ts', '!generators/**/*types.ts', '!generators/physics/data/**'];
const parts = (process.env.KILN_MUTATE ?? '').split(',').filter(Boolean);
const name = parts.length ? parts.join('+').replace(/[^\w+.-]/g, '_') : 'core';
const mutate = parts.length ? parts.map((p) => (p.endsWith('.ts') ? p : `${p}/**/*.ts`)) : CORE;

/** @type {import('@stryker-mutator/api/core').PartialStrykerOptions} */
export default {
  testRunner: 'vitest',
  // related: only the test files that import the mutated code run (vitest's dependency graph).
  vitest: { configFile: 'vitest.mutate.config.ts', related: true },
  checkers: ['typescript'],
  // Type-check mutants against generators/ only: the site's Astro types are not needed (and not in the sandbox).
  tsconfigFile: 'tsconfig.mutate.json',
  typescriptChecker: { prioritizePerformanceOverAccuracy: true },
  coverageAnalysis: 'perTest',
  concurrency: 1,
  // Reference tests start Debian's python per file; give a mutant's run room before calling it a timeout.
  timeoutMS: 60_000,
  timeoutFactor: 2,
  // The first (coverage) run executes every related test once; on 2 loaded cores that took over
  // Stryker's default 5 minutes for generators/numeric, which nearly every core test imports.
  dryRunTimeoutMinutes: 30,
  reporters: ['clear-text', 'progress', 'json', 'html'],
  jsonReporter: { fileName: `.kiln/mutation/report-${name}.json` },
  htmlReporter: { fileName: `.kiln/mutation/report-${name}.html` },
  tempDirName: '.kiln/stryker-tmp',
  incremental: true,
  incrementalFile: `.kiln/mutation/incremental-${name}.json`,
  thresholds: { high: 90, low: 85, break: null },
  // Equivalent or out-of-scope mutants are listed per file in the `// Stryker disable` comments of
  // the source, each with its reason.
  ignoreStatic: true,
  mutate: [...mutate, ...NOT_MUTATED],
  ignorePatterns: ['dist', '.kiln', '.astro', 'bench'],
};
