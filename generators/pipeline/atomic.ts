/**
 * Atomic replacement of output trees and atomic, durable, contained writes of single files. A
 * build writes into a staging directory next to the target; only a complete tree is swapped in,
 * so a crash or kill mid-build leaves the previous output intact and never a half-written
 * product. A file Kiln changes in the content tree is written to a temporary file beside it,
 * fsynced, and renamed over the old one: a kill or a full disk leaves the old file or the new,
 * never an empty or partial one.
 */
import { closeSync, existsSync, fsyncSync, lstatSync, mkdirSync, openSync, readdirSync, realpathSync, renameSync, rmSync, unlinkSync, writeSync } from 'node:fs';
import { dirname, basename, join, relative, isAbsolute } from 'node:path';
import { KilnInputError } from '../errors.ts';
import { processAlive } from './lock.ts';
import { reached, type Phase } from './phase.ts';

/** Staging directory beside `target` (same filesystem, so rename is atomic). */
export function stagingDir(target: string): string {
  const dir = join(dirname(target), `.${basename(target)}.staging-${process.pid}`);
  rmSync(dir, { recursive: true, force: true });
  mkdirSync(dir, { recursive: true });
  return dir;
}

function previousDir(target: string): string {
  return join(dirname(target), `.${basename(target)}.previous`);
}

/**
 * If an earlier swap was interrupted between its two renames, the previous tree is still in
 * its side directory: put it back before anything reads the target.
 */
export function recoverInterruptedSwap(target: string): void {
  const prev = previousDir(target);
  if (!existsSync(target) && existsSync(prev)) renameSync(prev, target);
  else if (existsSync(prev)) rmSync(prev, { recursive: true, force: true });
}

/** Replaces `target` by the complete tree in `staging`. `phase` names the moment between the renames (test hook). */
export function swapInto(staging: string, target: string, phase?: Phase): void {
  mkdirSync(dirname(target), { recursive: true });
  recoverInterruptedSwap(target);
  const prev = previousDir(target);
  if (existsSync(target)) renameSync(target, prev);
  if (phase) reached(phase);
  renameSync(staging, target);
  rmSync(prev, { recursive: true, force: true });
}

/** fsync of a directory, so that a rename in it survives a power cut (POSIX; a no-op where unsupported). */
export function fsyncDir(dir: string): void {
  let fd: number | undefined;
  try {
    fd = openSync(dir, 'r');
    fsyncSync(fd);
  } catch {
    // Some file systems refuse fsync on directories; the rename is still atomic.
  } finally {
    if (fd !== undefined) closeSync(fd);
  }
}

/** Writes and fsyncs a file in place (inside a staging directory that is renamed later). */
export function writeFileSynced(path: string, bytes: Uint8Array | string): void {
  const data = typeof bytes === 'string' ? Buffer.from(bytes, 'utf8') : bytes;
  const fd = openSync(path, 'w');
  try {
    let off = 0;
    while (off < data.length) off += writeSync(fd, data, off, data.length - off);
    fsyncSync(fd);
  } finally {
    closeSync(fd);
  }
}

function tempNameOf(path: string): string {
  return join(dirname(path), `.${basename(path)}.tmp-${process.pid}`);
}

/**
 * Writes a file durably: temp file in the same directory, fsync, rename, fsync of the directory.
 * On failure (a full disk, say) the temp file is removed and the old file stays as it was.
 * `phase` names the moment the temp file is complete and not yet renamed (test hook).
 */
export function writeFileDurable(path: string, bytes: Uint8Array | string, phase?: Phase): void {
  mkdirSync(dirname(path), { recursive: true });
  const tmp = tempNameOf(path);
  try {
    writeFileSynced(tmp, bytes);
    if (phase) reached(phase);
    renameSync(tmp, path);
  } catch (e) {
    rmSync(tmp, { force: true });
    throw e;
  }
  fsyncDir(dirname(path));
}

/** `path` must lie inside `root` (after resolving links of both) and not be a link itself. */
export function assertContained(root: string, path: string, what: string): void {
  const realRoot = realpathSync(root);
  let realParent: string;
  try {
    realParent = realpathSync(dirname(path));
  } catch {
    throw new KilnInputError(`${what}: its directory does not exist`, { file: path, expected: `a path inside ${root}` });
  }
  const rel = relative(realRoot, join(realParent, basename(path)));
  if (rel === '' || rel.startsWith('..') || isAbsolute(rel))
    throw new KilnInputError(`${what} lies outside the content tree`, { file: path, expected: `a path inside ${root}` });
  try {
    if (lstatSync(path).isSymbolicLink())
      throw new KilnInputError(`${what} is a symbolic link; Kiln does not write through links`, { file: path, expected: 'a regular file (replace the link by the file)' });
  } catch (e) {
    if (e instanceof KilnInputError) throw e;
  }
}

/** The one way Kiln changes a file of the content tree: contained, atomic, durable. */
export function writeContentFile(root: string, path: string, bytes: Uint8Array | string, phase?: Phase): void {
  assertContained(root, path, 'file to change');
  removeStaleTemps(path);
  writeFileDurable(path, bytes, phase);
}

/** Temp files of `writeFileDurable` for `path` left by killed processes. */
export function removeStaleTemps(path: string): void {
  removeStale(dirname(path), `.${basename(path)}.tmp-`, (p) => unlinkSync(p));
}

/** Removes staging directories left behind by killed runs of the step writing `target`. */
export function removeStaleStaging(target: string): void {
  removeStale(dirname(target), `.${basename(target)}.staging-`, (p) => rmSync(p, { recursive: true, force: true }));
}

/** Entries `<prefix><pid>` of `dir` whose process is gone (or is this one): removed. */
export function removeStale(dir: string, prefix: string, remove: (path: string) => void): void {
  if (!existsSync(dir)) return;
  // Only our own naming pattern, never anything else in the directory.
  for (const name of readdirSafe(dir)) {
    if (!name.startsWith(prefix)) continue;
    const pid = Number(name.slice(prefix.length).split('-')[0]);
    if (Number.isInteger(pid) && pid !== process.pid && processAlive(pid)) continue; // another run is working
    remove(join(dir, name));
  }
}

function readdirSafe(dir: string): string[] {
  try {
    return readdirSync(dir);
  } catch {
    return [];
  }
}
