#!/usr/bin/env node
// `npm run mutate [-- FOLDER...] [stryker options]`: StrykerJS on the core (stryker.config.mjs).
// Without a folder every core folder; with one (`checks`, `physics`, `pipeline/atomic.ts`, ...)
// only that part, incrementally: results for unchanged code and tests are reused from
// .kiln/mutation/incremental-<name>.json. Prints the wall time at the end. Not part of CI.
import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';

const args = process.argv.slice(2);
const folders = args.filter((a) => !a.startsWith('-'));
const options = args.filter((a) => a.startsWith('-'));
const parts = folders.map((f) => (f.startsWith('generators/') ? f : `generators/${f}`));
for (const p of parts) {
  if (!existsSync(p)) {
    console.error(`mutate: no such part of the core: ${p}`);
    process.exit(2);
  }
}
const t0 = Date.now();
const r = spawnSync(process.execPath, ['node_modules/@stryker-mutator/core/bin/stryker.js', 'run', ...options], {
  stdio: 'inherit',
  env: { ...process.env, KILN_MUTATE: parts.join(',') },
});
console.log(`mutate: ${((Date.now() - t0) / 1000).toFixed(0)} s wall`);
process.exit(r.status ?? 1);
