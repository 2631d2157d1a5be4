/**
 * The record of the last whole build into an output directory, kept in the build's cache:
 * what it was built from (a key over every byte of the content tree, the generator version and
 * Node's version) and the digest of every file it wrote. A build whose key equals the record's,
 * into an output whose files still have that digest, would write exactly those bytes again
 * (the build is deterministic: tests/pipeline/determinism.test.ts), so it leaves them in place.
 *
 *   <cache>/builds/<digest of the output path>.json   BuildStamp + its own SHA-256
 *
 * Nothing here is trusted blindly: the record is sealed by its SHA-256, and the output is read
 * back and hashed whole each time, so an edited, added or deleted output file, a damaged record
 * or any change under the content tree means a real build. Anything that is not a plain file
 * or folder (a link, a FIFO) in either tree means a real build too.
 */
import { createHash } from 'node:crypto';
import { lstatSync, mkdirSync, readdirSync, readFileSync, renameSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { sha256Hex } from './hash.ts';

const SCHEMA = 'kiln/build-stamp/1';
const DIR = 'builds';
/** Hex digits of the output path's digest in the record's name. */
const NAME_HEX = 16;

export interface BuildStamp<S> {
  schema: typeof SCHEMA;
  /** Absolute output directory the record is about. */
  outDir: string;
  /** buildKey() of the build that wrote it. */
  key: string;
  /** treeDigest() of what it wrote. */
  output: TreeDigest;
  /** That build's summary, returned as is by a build that leaves the output in place. */
  summary: S;
}

export interface TreeDigest {
  sha256: string;
  files: number;
  bytes: number;
}

/**
 * Digest of a folder: every file's path (relative, '/'-separated, in sorted order), size and
 * bytes. null when the folder is missing or holds anything but plain files and folders.
 */
export function treeDigest(root: string): TreeDigest | null {
  const h = createHash('sha256');
  let files = 0;
  let bytes = 0;
  const walk = (dir: string, rel: string): boolean => {
    for (const name of readdirSync(dir).sort()) {
      const p = join(dir, name);
      const r = rel ? `${rel}/${name}` : name;
      const st = lstatSync(p);
      if (st.isDirectory()) {
        h.update(`d\0${r}\0`);
        if (!walk(p, r)) return false;
      } else if (st.isFile()) {
        const b = readFileSync(p);
        h.update(`f\0${r}\0${b.length}\0`).update(b);
        files++;
        bytes += b.length;
      } else return false;
    }
    return true;
  };
  try {
    if (!lstatSync(root).isDirectory() || !walk(root, '')) return null;
  } catch {
    return null;
  }
  return { sha256: h.digest('hex'), files, bytes };
}

/** What a whole build's output depends on: the content tree's bytes, the generator, Node. null: the tree cannot be keyed (see treeDigest). */
export function buildKey(contentDir: string, generator: string): string | null {
  const content = treeDigest(contentDir);
  if (!content) return null;
  // Node's version: its Math functions are the engine's, and an engine update may move a last bit.
  return sha256Hex(JSON.stringify({ schema: SCHEMA, content: content.sha256, generator, node: process.version }));
}

/** Where the record of builds into outDir is kept in a cache. */
export const stampFile = (cacheDir: string, outDir: string): string => join(cacheDir, DIR, `${sha256Hex(outDir).slice(0, NAME_HEX)}.json`);

/** The record for outDir if present and intact, else null. */
export function readBuildStamp<S>(cacheDir: string, outDir: string): BuildStamp<S> | null {
  try {
    const { stamp, sha256 } = JSON.parse(readFileSync(stampFile(cacheDir, outDir), 'utf8')) as { stamp: string; sha256: string };
    if (typeof stamp !== 'string' || sha256Hex(stamp) !== sha256) return null;
    const s = JSON.parse(stamp) as BuildStamp<S>;
    return s.schema === SCHEMA && s.outDir === outDir ? s : null;
  } catch {
    return null;
  }
}

/** Records a finished whole build (written whole under a temporary name, then renamed). */
export function writeBuildStamp<S>(cacheDir: string, stamp: Omit<BuildStamp<S>, 'schema'>): void {
  const file = stampFile(cacheDir, stamp.outDir);
  mkdirSync(join(cacheDir, DIR), { recursive: true });
  const text = JSON.stringify({ schema: SCHEMA, ...stamp });
  const tmp = `${file}.tmp-${process.pid}`;
  writeFileSync(tmp, JSON.stringify({ stamp: text, sha256: sha256Hex(text) }));
  renameSync(tmp, file);
}

/** Whether `outDir` holds exactly what the recorded build with this key wrote. */
export function outputIsCurrent<S>(stamp: BuildStamp<S> | null, key: string | null, outDir: string): stamp is BuildStamp<S> {
  if (!stamp || key === null || stamp.key !== key) return false;
  const now = treeDigest(outDir);
  return now !== null && now.sha256 === stamp.output.sha256 && now.files === stamp.output.files;
}
