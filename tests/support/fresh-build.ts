/**
 * Site and browser tests read a build (dist/, .kiln/out) made by `npm run build`. A build older
 * than the code or content it was made from tests yesterday's site: refuse it, naming the newest
 * input, so nobody reads a green run from a stale build. The inputs are those the build reads:
 * content/, generators/, src/, the site step and the Astro config.
 */
import { existsSync, readdirSync, statSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
import { buildKey, outputIsCurrent, readBuildStamp } from '../../generators/pipeline/build-stamp.ts';
import { defaultCacheDir } from '../../generators/pipeline/build.ts';
import { generatorVersion } from '../../generators/pipeline/generator-version.ts';

const REPO = resolve(import.meta.dirname, '..', '..');
const INPUTS = ['content', 'generators', 'src', 'scripts/build-site.mjs', 'astro.config.mjs', 'bin/kiln.mjs'];

/** Newest modification time under the build's inputs, and the file it belongs to. */
export function newestInput(root = REPO): { file: string; mtimeMs: number } {
  let best = { file: '', mtimeMs: 0 };
  const visit = (p: string) => {
    const st = statSync(p);
    if (st.isDirectory()) {
      for (const n of readdirSync(p)) visit(join(p, n));
    } else if (st.mtimeMs > best.mtimeMs) best = { file: relative(root, p), mtimeMs: st.mtimeMs };
  };
  for (const i of INPUTS) if (existsSync(join(root, i))) visit(join(root, i));
  return best;
}

/**
 * Throws unless `marker` (a file the build writes last, e.g. dist/index.html) exists and is newer
 * than every input. `what` names the build for the message.
 */
export function requireFreshBuild(marker: string, what: string, root = REPO): void {
  if (!existsSync(marker)) throw new Error(`${what} is missing (${relative(root, marker)}): run npm run build first`);
  const built = statSync(marker).mtimeMs;
  const newest = newestInput(root);
  if (newest.mtimeMs > built)
    throw new Error(
      `${what} is stale: ${newest.file} changed ${((newest.mtimeMs - built) / 1000).toFixed(0)} s after ${relative(root, marker)} was built; run npm run build again`,
    );
}

export const DIST_MARKER = join(REPO, 'dist', 'index.html');
export const OUT_MARKER = join(resolve(process.env.KILN_OUT ?? join(REPO, '.kiln', 'out')), 'index.json');

/**
 * The build output (.kiln/out) is fresh when newer than every input, or when the record of the
 * build that wrote it says it is what a build of content/ with today's generator would write: a
 * build with nothing changed leaves the output in place (generators/pipeline/build-stamp.ts), so
 * an input touched without a change (a checkout, an undone edit) must not make it look stale.
 */
export function requireFreshOutput(what: string, marker = OUT_MARKER, root = REPO): void {
  try {
    requireFreshBuild(marker, what, root);
  } catch (e) {
    const out = dirname(marker);
    if (existsSync(marker) && outputIsCurrent(readBuildStamp(defaultCacheDir(out), out), buildKey(join(root, 'content'), generatorVersion()), out)) return;
    throw e;
  }
}
