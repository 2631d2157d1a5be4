import { availableParallelism } from 'node:os';
import { defineConfig } from 'vitest/config';

export default defineConfig({
  test: {
    include: ['tests/**/*.test.ts'],
    // Timeouts catch hangs only: speed targets live in `npm run bench`, never in a test's clock.
    // Tests that spawn demo builds take tens of seconds on a loaded 2-core machine.
    testTimeout: 300_000,
    hookTimeout: 300_000,
    pool: 'forks',
    // Vitest's default (one core left free) runs a 2-core machine's files one at a time, yet most
    // test time is spent waiting on child processes (builds, Python, chromium): two files at once.
    maxWorkers: Math.max(2, availableParallelism() - 1),
  },
});
