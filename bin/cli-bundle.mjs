// The CLI as one prebuilt script, cached by the digest of its sources (plain JavaScript: it runs
// before any TypeScript loader).
//
// Through the TypeScript loader a `kiln` command spends about 1 s of CPU before it does anything
// (the loader, then ~200 modules transformed one by one: `kiln build --help` took 1.0–1.2 s of CPU
// against 0.22 s from one bundled script, measured 2026-12-04 on the project's 2-core machine).
// The bundle is made by esbuild from the sources on disk the first time a command runs after any
// change, and kept in node_modules/.cache/kiln-cli/ under the digest of every file it could have
// been made from (generators/, package.json, this file), so a changed source is never run from an
// old bundle. Its first line holds the SHA-256 of the rest: a damaged file is made again, never run.
// Packages stay external (Node loads them from node_modules as it would); each module's
// `import.meta.url` is set to its own source file's URL, so paths found from it (the worker
// modules, the generator's own sources, the project root) are those of the sources.
//
// Anything that goes wrong here (no esbuild, a read-only install) returns null and the caller
// runs the sources through the loader: the same code, only slower to start.
import { createHash } from 'node:crypto';
import { mkdirSync, readdirSync, readFileSync, renameSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { dirname, join, relative } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const ROOT = join(dirname(fileURLToPath(import.meta.url)), '..');
const GENERATORS = join(ROOT, 'generators');
const ENTRY = join(GENERATORS, 'cli', 'main.ts');
const CACHE_DIR = join(ROOT, 'node_modules', '.cache', 'kiln-cli');
const HEADER = '// kiln cli bundle sha256:';
/** Hex digits of the source digest in the file name (64 bits). */
const NAME_HEX = 16;
/** Bundles of other sources kept beside the current one. */
const KEEP_OTHERS = 7;

function sources(dir) {
  const out = [];
  for (const name of readdirSync(dir).sort()) {
    const p = join(dir, name);
    if (statSync(p).isDirectory()) out.push(...sources(p));
    else if (/\.(ts|mjs|js|json)$/.test(name)) out.push(p);
  }
  return out;
}

/** Digest of everything the bundle is made from. */
export function sourceDigest() {
  const h = createHash('sha256');
  for (const f of [...sources(GENERATORS), join(ROOT, 'package.json'), fileURLToPath(import.meta.url)])
    h.update(relative(ROOT, f)).update('\0').update(readFileSync(f)).update('\0');
  return h.digest('hex');
}

const sha256 = (text) => createHash('sha256').update(text).digest('hex');

/** The bundle's text if `file` holds an intact one, else null. */
function intact(file) {
  let text;
  try {
    text = readFileSync(file, 'utf8');
  } catch {
    return null;
  }
  const nl = text.indexOf('\n');
  if (nl < 0 || !text.startsWith(HEADER)) return null;
  return text.slice(HEADER.length, nl) === sha256(text.slice(nl + 1)) ? text : null;
}

/** Each module's import.meta.url is its own source file's URL. */
const ownMetaUrl = {
  name: 'own-import-meta-url',
  setup(build) {
    build.onLoad({ filter: /\.(ts|mjs)$/ }, (a) => ({
      contents: readFileSync(a.path, 'utf8').replaceAll('import.meta.url', JSON.stringify(pathToFileURL(a.path).href)),
      loader: a.path.endsWith('.ts') ? 'ts' : 'js',
    }));
  },
};

async function make(file) {
  const { build } = await import('esbuild');
  const out = await build({
    entryPoints: [ENTRY],
    bundle: true,
    platform: 'node',
    format: 'esm',
    target: `node${process.versions.node.split('.')[0]}`,
    packages: 'external',
    plugins: [ownMetaUrl],
    write: false,
    logLevel: 'silent',
  });
  const body = out.outputFiles[0].text;
  mkdirSync(CACHE_DIR, { recursive: true });
  // Written whole under a temporary name, then renamed: a reader never sees half a file.
  const tmp = `${file}.${process.pid}.tmp`;
  writeFileSync(tmp, `${HEADER}${sha256(body)}\n${body}`);
  renameSync(tmp, file);
  // Bundles of other sources: the newest few are kept (other checkouts sharing node_modules, a
  // mutation-testing sandbox), older ones removed.
  const others = readdirSync(CACHE_DIR)
    .filter((n) => /^cli-[0-9a-f]+\.mjs$/.test(n) && join(CACHE_DIR, n) !== file)
    .map((n) => ({ p: join(CACHE_DIR, n), t: statSync(join(CACHE_DIR, n)).mtimeMs }))
    .sort((a, b) => b.t - a.t);
  for (const o of others.slice(KEEP_OTHERS)) rmSync(o.p, { force: true });
}

/** URL of the bundled CLI for the sources on disk (made now if needed), or null to run the sources through the loader. */
export async function bundledCli() {
  try {
    const file = join(CACHE_DIR, `cli-${sourceDigest().slice(0, NAME_HEX)}.mjs`);
    if (!intact(file)) {
      await make(file);
      if (!intact(file)) return null;
    }
    return pathToFileURL(file);
  } catch {
    return null;
  }
}
