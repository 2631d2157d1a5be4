/**
 * Atomic replacement of output trees. A build writes into a staging directory next to the
 * target; only a complete tree is swapped in, so a crash or kill mid-build leaves the previous
 * output intact and never a half-written product.
 */
import { closeSync, existsSync, fsyncSync, mkdirSync, openSync, readdirSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { dirname, basename, join } from 'node:path';

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

/** Replaces `target` by the complete tree in `staging`. */
export function swapInto(staging: string, target: string): void {
  mkdirSync(dirname(target), { recursive: true });
  recoverInterruptedSwap(target);
  const prev = previousDir(target);
  if (existsSync(target)) renameSync(target, prev);
  renameSync(staging, target);
  rmSync(prev, { recursive: true, force: true });
}

/** Writes a file durably: temp file in the same directory, fsync, rename. */
export function writeFileDurable(path: string, bytes: Uint8Array | string): void {
  mkdirSync(dirname(path), { recursive: true });
  const tmp = join(dirname(path), `.${basename(path)}.tmp-${process.pid}`);
  writeFileSync(tmp, bytes);
  const fd = openSync(tmp, 'r');
  try {
    fsyncSync(fd);
  } finally {
    closeSync(fd);
  }
  renameSync(tmp, path);
}

/** Removes staging directories left behind by killed builds. */
export function removeStaleStaging(target: string): void {
  const parent = dirname(target);
  if (!existsSync(parent)) return;
  // Only our own naming pattern, never anything else in the parent.
  const prefix = `.${basename(target)}.staging-`;
  for (const name of readdirSafe(parent)) {
    if (!name.startsWith(prefix)) continue;
    const pid = Number(name.slice(prefix.length));
    if (Number.isInteger(pid) && pid !== process.pid && processAlive(pid)) continue; // another build is running
    rmSync(join(parent, name), { recursive: true, force: true });
  }
}

function processAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
}

function readdirSafe(dir: string): string[] {
  try {
    return readdirSync(dir);
  } catch {
    return [];
  }
}
