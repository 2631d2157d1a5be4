// Site step of `kiln site` (so of `npm run build`): runs Astro and swaps the complete site into
// the target only when it succeeded, so a failed or killed build leaves the previous site.
// Run from the project root (Astro's root); `kiln site` sets where to read and write:
//   KILN_OUT        the kiln build output the pages read (default .kiln/out)
//   KILN_CONTENT    the content tree the content collections read (default content)
//   KILN_SITE_DIST  the site folder (default dist)
// Astro writes into a folder inside the project (an outDir outside the root gains Astro's
// content-layer files), then the site moves into the staging folder beside the target.
// Same staging, swap, recovery and lock as `kiln build` (generators/pipeline/atomic.ts, lock.ts):
// a killed run's staging is removed by the next run, a kill between the two renames of the swap
// is repaired by the next run, and a second site build into the same dist/ refuses (exit 4).
import { register } from 'tsx/esm/api';
import { cpSync, renameSync, rmSync } from 'node:fs';
import { resolve } from 'node:path';

register();
const { recoverInterruptedSwap, removeStaleStaging, stagingDir, swapInto } = await import('../generators/pipeline/atomic.ts');
const { acquireLock } = await import('../generators/pipeline/lock.ts');
const { reached } = await import('../generators/pipeline/phase.ts');
const { reportFailure } = await import('../generators/cli/main.ts');

process.env.ASTRO_TELEMETRY_DISABLED = '1';
const debug = process.argv.includes('--debug');
const target = resolve(process.env.KILN_SITE_DIST ?? 'dist');

let lock;
try {
  lock = acquireLock(target, 'kiln site build');
  // The site reads the build's output: repair an interrupted swap of it first.
  recoverInterruptedSwap(resolve(process.env.KILN_OUT ?? '.kiln/out'));
  recoverInterruptedSwap(target);
  removeStaleStaging(target);
} catch (e) {
  process.exit(reportFailure('site', e, debug));
}
const staging = stagingDir(target);
const t0 = performance.now();
try {
  const work = resolve(`.kiln/site-build-${process.pid}`);
  try {
    await build({ root: process.cwd(), outDir: work, logLevel: process.env.KILN_SITE_LOG ?? 'warn' });
    moveInto(work, staging);
  } finally {
    rmSync(work, { recursive: true, force: true });
  }
  reached('site:staged');
  swapInto(staging, target, 'site:swap');
} catch (e) {
  removeStaleStaging(target);
  lock.release();
  process.exit(reportFailure('site', e, debug));
}
lock.release();
console.log(`kiln site: ${target} written in ${((performance.now() - t0) / 1000).toFixed(1)} s`);

async function build(config) {
  const astro = await import('astro');
  await astro.build(config);
}

/** Moves a finished folder onto the (empty) staging folder; copies across file systems. */
function moveInto(from, to) {
  try {
    renameSync(from, to);
  } catch (e) {
    if (e?.code !== 'EXDEV') throw e;
    cpSync(from, to, { recursive: true });
  }
}
