/**
 * Atomic replacement of output trees and atomic, durable, contained writes of single files. A
 * build writes into a staging directory next to the target; only a complete tree is swapped in,
 * so a crash or kill mid-build leaves the previous output intact and never a half-written
 * product. A file Kiln changes in the content tree is written to a temporary file beside it,
 * fsynced, and renamed over the old one: a kill or a full disk leaves the old file or the new,
 * never an empty or partial one.
 */
import { existsSync, mkdirSync, readdirSync, renameSync, rmSync, unlinkSync } from 'node:fs';
import { dirname, basename, join } from 'node:path';
import { assertContained, writeFileAtomic } from '../node/files.ts';
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

/** Atomic write (node/files.ts writeFileAtomic) into a folder created when missing (build outputs). */
export function writeFileDurable(path: string, bytes: Uint8Array | string, phase?: Phase): void {
  mkdirSync(dirname(path), { recursive: true });
  writeFileAtomic(path, bytes, phase ? () => reached(phase) : undefined);
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
