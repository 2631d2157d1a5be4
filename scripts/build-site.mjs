// Site step of `kiln site` (and so of `npm run build`): runs Astro into a staging directory beside
// the target and swaps the complete site in only when it succeeded, so a failed or killed build
// leaves the previous site as it was. Run from the project root (Astro's root); where to read and
// write comes from the environment `kiln site` sets:
//   KILN_OUT       the kiln build output the pages read (default .kiln/out)
//   KILN_CONTENT   the content tree the content collections read (default content)
//   KILN_SITE_OUT  the site folder to write (default dist)
// Astro keeps its build cache in the project (node_modules/.astro): one site build per checkout at a time.
import { build } from 'astro';
import { cpSync, existsSync, mkdirSync, renameSync, rmSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';

process.env.ASTRO_TELEMETRY_DISABLED = '1';
const target = resolve(process.env.KILN_SITE_OUT ?? 'dist');
const staging = join(dirname(target), `.${basename(target)}.staging-${process.pid}`);
const previous = join(dirname(target), `.${basename(target)}.previous`);

// An earlier swap interrupted between its two renames left the old site aside: restore it.
if (!existsSync(target) && existsSync(previous)) renameSync(previous, target);
rmSync(previous, { recursive: true, force: true });
rmSync(staging, { recursive: true, force: true });

// Astro writes into a folder inside the project (an outDir outside the root gains Astro's
// content-layer files); the finished site then moves beside the target.
const work = resolve(`.kiln/site-build-${process.pid}`);
const t0 = performance.now();
try {
  await build({ root: process.cwd(), outDir: work, logLevel: process.env.KILN_SITE_LOG ?? 'warn' });
  mkdirSync(dirname(target), { recursive: true });
  try {
    renameSync(work, staging);
  } catch (e) {
    if (e?.code !== 'EXDEV') throw e;
    cpSync(work, staging, { recursive: true });
  }
} catch (e) {
  rmSync(staging, { recursive: true, force: true });
  console.error(`kiln site: build failed, ${target} left as it was: ${e instanceof Error ? e.message : e}`);
  process.exit(1);
} finally {
  rmSync(work, { recursive: true, force: true });
}
if (existsSync(target)) renameSync(target, previous);
renameSync(staging, target);
rmSync(previous, { recursive: true, force: true });
console.log(`kiln site: ${target} written in ${((performance.now() - t0) / 1000).toFixed(1)} s`);
