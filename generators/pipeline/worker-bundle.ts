/**
 * A worker thread's code as one prebuilt script (Node only).
 *
 * Started through the TypeScript loader (the `*-entry.mjs` files), a worker spends about 0.4 s of
 * CPU before it can take work: the loader itself, then ~40 modules transformed one by one. The
 * same modules bundled by esbuild into one CommonJS script start in under 0.1 s (measured
 * 2026-12-04 on the project's 2-core machine, the matrix worker: 431–474 ms against 84–117 ms from
 * spawn to ready). The bundle is made from the `.ts` sources on disk, once per process and entry,
 * in esbuild's own process, so the calling thread goes on computing meanwhile; it is the code of
 * this checkout, not a copy that could go stale.
 *
 * Bundling is only a faster start of the same code: if esbuild is missing or fails, the promise
 * resolves to null and the caller starts the loader entry instead (same results, slower start).
 */
import { fileURLToPath } from 'node:url';

const bundles = new Map<string, Promise<string | null>>();

/** Node's own version, as esbuild's target (language features the bundle may keep as written). */
const NODE_TARGET = `node${process.versions.node.split('.')[0]}`;

/** The source of `entry` (a `.ts` module URL) and everything it imports, as one CommonJS script; null when it cannot be made. */
export function workerBundle(entry: URL): Promise<string | null> {
  const key = entry.href;
  let p = bundles.get(key);
  if (!p) {
    p = bundle(entry);
    bundles.set(key, p);
  }
  return p;
}

async function bundle(entry: URL): Promise<string | null> {
  try {
    const { build } = await import('esbuild');
    const out = await build({
      entryPoints: [fileURLToPath(entry)],
      bundle: true,
      platform: 'node',
      format: 'cjs',
      target: NODE_TARGET,
      write: false,
      logLevel: 'silent',
    });
    // A module that reads import.meta (empty in a CommonJS script) would see no URL of its own:
    // such a bundle is not used, the loader entry runs the modules as they are.
    if (out.warnings.some((w) => w.text.includes('import.meta'))) return null;
    return out.outputFiles[0]?.text ?? null;
  } catch {
    return null;
  }
}
