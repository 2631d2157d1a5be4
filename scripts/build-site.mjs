// Site build step of `npm run build`: runs Astro into a staging directory and swaps the complete
// site into dist/ only when it succeeded, so a failed or killed build leaves the previous dist/.
import { build } from 'astro';
import { existsSync, renameSync, rmSync } from 'node:fs';
import { resolve } from 'node:path';

process.env.ASTRO_TELEMETRY_DISABLED = '1';
const target = resolve('dist');
const staging = resolve(`.kiln/dist-staging-${process.pid}`);
const previous = resolve('.kiln/dist-previous');

// An earlier swap interrupted between its two renames left the old site aside: restore it.
if (!existsSync(target) && existsSync(previous)) renameSync(previous, target);
rmSync(previous, { recursive: true, force: true });
rmSync(staging, { recursive: true, force: true });

const t0 = performance.now();
try {
  await build({ root: process.cwd(), outDir: staging, logLevel: process.env.KILN_SITE_LOG ?? 'warn' });
} catch (e) {
  rmSync(staging, { recursive: true, force: true });
  console.error(`kiln site: build failed, dist/ left as it was: ${e instanceof Error ? e.message : e}`);
  process.exit(1);
}
if (existsSync(target)) renameSync(target, previous);
renameSync(staging, target);
rmSync(previous, { recursive: true, force: true });
console.log(`kiln site: dist/ written in ${((performance.now() - t0) / 1000).toFixed(1)} s`);
