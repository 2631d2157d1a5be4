/**
 * A worker thread's code as one prebuilt script (Node only).
 *
 * Started through the TypeScript loader (the `*-entry.mjs` files), a worker spends about 0.4 s of
 * CPU before it can take work: the loader itself, then ~40 modules transformed one by one. The
 * same modules bundled by esbuild into one CommonJS script start in under 0.1 s (measured
 * 2026-12-04 on the project's 2-core machine, the matrix worker: 431–474 ms against 84–117 ms from
 * spawn to ready). Making the bundle costs ~0.2 s (esbuild's process started, the modules read),
 * so it is kept in node_modules/.cache/kiln-workers/ under a digest of everything it can be made
 * from (every source under generators/ and the package version, i.e. the generator version; the
 * package lock; the entry), its first line the SHA-256 of the rest: a changed source is never run
 * from an old bundle, a damaged file is made again. Made in esbuild's own process, so the calling
 * thread goes on computing meanwhile.
 *
 * Bundling is only a faster start of the same code: if esbuild is missing or fails, the promise
 * resolves to null and the caller starts the loader entry instead (same results, slower start).
 */
import { mkdirSync, readFileSync, renameSync, writeFileSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { generatorVersion } from './generator-version.ts';
import { sha256Hex } from './hash.ts';

const ROOT = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
const CACHE_DIR = join(ROOT, 'node_modules', '.cache', 'kiln-workers');
const HEADER = '// kiln worker bundle sha256:';
/** Hex digits of the digest in the file name (64 bits). */
const NAME_HEX = 16;

const bundles = new Map<string, Promise<string | null>>();

/** Node's own version, as esbuild's target (language features the bundle may keep as written). */
const NODE_TARGET = `node${process.versions.node.split('.')[0]}`;

/** The source of `entry` (a `.ts` module URL) and everything it imports, as one CommonJS script; null when it cannot be made. */
export function workerBundle(entry: URL): Promise<string | null> {
  const key = entry.href;
  let p = bundles.get(key);
  if (!p) {
    p = cachedOrMade(entry);
    bundles.set(key, p);
  }
  return p;
}

function cacheFile(path: string): string {
  let lock = '';
  try {
    lock = sha256Hex(readFileSync(join(ROOT, 'package-lock.json')));
  } catch {
    // No lock file: the digest of the sources alone.
  }
  const digest = sha256Hex(`${generatorVersion()}\0${lock}\0${path}\0${NODE_TARGET}`);
  return join(CACHE_DIR, `${basename(path, '.ts')}-${digest.slice(0, NAME_HEX)}.cjs`);
}

/** The bundle's body if `file` holds an intact one, else null. */
function intact(file: string): string | null {
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch {
    return null;
  }
  const nl = text.indexOf('\n');
  if (nl < 0 || !text.startsWith(HEADER)) return null;
  const body = text.slice(nl + 1);
  return text.slice(HEADER.length, nl) === sha256Hex(body) ? body : null;
}

/** The kept bundle of `entry` and its file, if intact (null body otherwise). */
export function keptBundle(entry: URL): { file: string; body: string | null } {
  const file = cacheFile(fileURLToPath(entry));
  return { file, body: intact(file) };
}

async function cachedOrMade(entry: URL): Promise<string | null> {
  let file: string | null = null;
  try {
    file = cacheFile(fileURLToPath(entry));
    const kept = intact(file);
    if (kept !== null) return kept;
  } catch {
    file = null;
  }
  const body = await bundle(entry);
  if (body !== null && file !== null) {
    try {
      mkdirSync(CACHE_DIR, { recursive: true });
      // Written whole under a temporary name, then renamed: a reader never sees half a file.
      const tmp = `${file}.${process.pid}.tmp`;
      writeFileSync(tmp, `${HEADER}${sha256Hex(body)}\n${body}`);
      renameSync(tmp, file);
    } catch {
      // A read-only install: the bundle is made again by the next process.
    }
  }
  return body;
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
