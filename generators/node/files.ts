/**
 * File access shared by every Node part of Kiln: the one atomic write (temp file beside the
 * target, fsync, rename, fsync of the directory), containment of a path in a tree, and the one
 * bounded read of an untrusted regular file (no links, FIFOs or devices; a size limit named in
 * the error).
 */
import { closeSync, constants, fstatSync, fsyncSync, lstatSync, openSync, readSync, realpathSync, renameSync, unlinkSync, writeSync } from 'node:fs';
import { basename, dirname, isAbsolute, join, relative } from 'node:path';
import { inTermsOf, KilnInputError } from '../errors.ts';

/** fsync of a directory, so that a rename in it survives a power cut (a no-op where unsupported). */
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
export function writeFileSynced(path: string, bytes: Uint8Array | string, flags = 'w'): void {
  const data = typeof bytes === 'string' ? Buffer.from(bytes, 'utf8') : bytes;
  const fd = openSync(path, flags);
  try {
    let off = 0;
    while (off < data.length) off += writeSync(fd, data, off, data.length - off);
    fsyncSync(fd);
  } finally {
    closeSync(fd);
  }
}

/** Name of the temporary file of `writeFileAtomic` for `path` (prefix + pid: stale ones can be found). */
export function tempNameOf(path: string, n = 0): string {
  return join(dirname(path), `.${basename(path)}.tmp-${process.pid}${n ? `-${n}` : ''}`);
}

let tempCounter = 0;

/**
 * Writes bytes to a temporary file in the same directory, fsyncs it, renames it over `path`,
 * fsyncs the directory. On failure (a full disk, say) the temporary file is removed and `path`
 * holds what it held. `beforeRename` runs when the temporary file is complete (test hook).
 */
export function writeFileAtomic(path: string, bytes: Uint8Array | string, beforeRename?: () => void): void {
  const tmp = tempNameOf(path, ++tempCounter);
  try {
    writeFileSynced(tmp, bytes, 'wx');
    beforeRename?.();
    renameSync(tmp, path);
  } catch (e) {
    try {
      unlinkSync(tmp);
    } catch {
      /* never created, or already gone */
    }
    // Name the file the user asked for, not the temporary one (a write error carries no path).
    throw inTermsOf(e, path, [tmp]);
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
    throw new KilnInputError(`${what}: its folder does not exist`, { file: path, expected: `a path inside ${root}` });
  }
  const rel = relative(realRoot, join(realParent, basename(path)));
  if (rel === '' || rel.startsWith('..') || isAbsolute(rel))
    throw new KilnInputError(`${what} lies outside the content tree (through a symbolic link?)`, { file: path, expected: `a path inside ${root}; symbolic links are refused in the content tree` });
  let isLink = false;
  try {
    isLink = lstatSync(path).isSymbolicLink();
  } catch {
    /* does not exist yet */
  }
  if (isLink)
    throw new KilnInputError(`${what} is a symbolic link; symbolic links are refused in the content tree`, { file: path, expected: 'a regular file (replace the link by the file it points to)' });
}

function kindName(st: { isDirectory(): boolean; isFIFO(): boolean; isSocket(): boolean; isCharacterDevice(): boolean; isBlockDevice(): boolean; isSymbolicLink(): boolean }): string {
  if (st.isSymbolicLink()) return 'a symbolic link';
  if (st.isDirectory()) return 'a folder';
  if (st.isFIFO()) return 'a FIFO (named pipe)';
  if (st.isSocket()) return 'a socket';
  if (st.isCharacterDevice() || st.isBlockDevice()) return 'a device';
  return 'not a regular file';
}

export interface ReadLimit {
  /** Largest size accepted, bytes. */
  maxBytes: number;
  /** Name of the limit for the message, e.g. "the notes limit of 1 MiB". */
  limitName: string;
  /** What the file should be (for the message). */
  expected: string;
  /** A tree the file must lie in (links refused, real path inside). */
  root?: string;
}

/** Human size: "1 MiB". */
export function formatLimit(bytes: number): string {
  const MIB = 1024 * 1024;
  return bytes >= MIB && bytes % MIB === 0 ? `${bytes / MIB} MiB` : bytes % 1024 === 0 ? `${bytes / 1024} KiB` : `${bytes} bytes`;
}

/**
 * Reads an untrusted file: a regular file only (a link, FIFO, device or folder is refused without
 * opening it for long: O_NONBLOCK, O_NOFOLLOW), at most `maxBytes` (checked before reading and
 * while reading, so a file growing meanwhile is refused too). Errors name the file and the limit.
 */
export function readRegularFile(file: string, limit: ReadLimit): Uint8Array {
  if (limit.root) assertContained(limit.root, file, 'input file');
  let st;
  try {
    st = lstatSync(file);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    if (code === 'ENOENT' || code === 'ENOTDIR') throw new KilnInputError('file not found', { file, expected: limit.expected });
    throw e;
  }
  if (!st.isFile()) throw new KilnInputError(`is ${kindName(st)}; only regular files are read`, { file, expected: limit.expected });
  if (st.size > limit.maxBytes)
    throw new KilnInputError(`file is larger than ${limit.limitName} (${formatLimit(limit.maxBytes)})`, { file, value: `${st.size} bytes`, expected: `at most ${limit.maxBytes} bytes` });
  const fd = openSync(file, constants.O_RDONLY | constants.O_NOFOLLOW | constants.O_NONBLOCK);
  try {
    const fst = fstatSync(fd);
    if (!fst.isFile()) throw new KilnInputError(`is ${kindName(fst)}; only regular files are read`, { file, expected: limit.expected });
    const buf = Buffer.alloc(Math.min(limit.maxBytes + 1, Math.max(fst.size, 0) + 1));
    let n = 0;
    for (;;) {
      if (n === buf.length) break;
      const got = readSync(fd, buf, n, buf.length - n, null);
      if (got === 0) break;
      n += got;
    }
    if (n > limit.maxBytes || n > fst.size)
      throw new KilnInputError(`file grew while it was read, past ${limit.limitName}`, { file, expected: `at most ${limit.maxBytes} bytes, not changing while Kiln reads it` });
    return new Uint8Array(buf.buffer, buf.byteOffset, n);
  } finally {
    closeSync(fd);
  }
}
