/**
 * Node file access for FITS: read (plain or gzip-compressed) with a size bound. Writes go through
 * files.ts writeFileAtomic, so that a failed write never leaves a partial product behind.
 */
import { readFileSync, statSync } from 'node:fs';
import { gunzipSync } from 'node:zlib';
import { KilnInputError } from '../errors.ts';
import { readFits, type ChecksumPolicy, type FitsFile } from '../fits/index.ts';

/** Largest file (after decompression) read by default: generous for response matrices. */
export const DEFAULT_MAX_FITS_BYTES = 1024 * 1024 * 1024;
/** gzip magic bytes (RFC 1952 §2.3.1). */
const GZIP_MAGIC = [0x1f, 0x8b];

export interface ReadFitsFileOptions {
  maxBytes?: number;
  verifyChecksums?: ChecksumPolicy;
}

/** Reads a file's bytes, gunzipping when it starts with the gzip magic; errors name the path. */
export function readFitsBytes(path: string, opts: { maxBytes?: number } = {}): Uint8Array {
  const maxBytes = opts.maxBytes ?? DEFAULT_MAX_FITS_BYTES;
  let raw: Buffer;
  try {
    const st = statSync(path);
    if (!st.isFile()) throw new KilnInputError('not a regular file', { file: path, expected: 'a FITS file' });
    if (st.size > maxBytes) {
      throw new KilnInputError(`file is ${st.size} bytes, over the limit`, { file: path, expected: `at most ${maxBytes} bytes` });
    }
    raw = readFileSync(path);
  } catch (e) {
    if (e instanceof KilnInputError) throw e;
    const code = (e as NodeJS.ErrnoException).code;
    if (code === 'ENOENT' || code === 'ENOTDIR') throw new KilnInputError(`cannot read file (${code})`, { file: path, expected: 'a readable FITS file' });
    throw e; // permission, I/O: an environment failure, reported as such by the CLI
  }
  if (raw.length >= 2 && raw[0] === GZIP_MAGIC[0] && raw[1] === GZIP_MAGIC[1]) {
    try {
      raw = gunzipSync(raw, { maxOutputLength: maxBytes });
    } catch (e) {
      const tooBig = (e as NodeJS.ErrnoException).code === 'ERR_BUFFER_TOO_LARGE' || e instanceof RangeError;
      throw new KilnInputError(tooBig ? 'gzip content is larger than the limit' : `corrupt gzip data (${(e as Error).message})`, {
        file: path,
        expected: tooBig ? `at most ${maxBytes} bytes after decompression` : 'a complete gzip stream holding a FITS file',
      });
    }
  }
  return new Uint8Array(raw.buffer, raw.byteOffset, raw.byteLength);
}

/** Reads and parses a FITS file (gzip allowed); errors carry the path. */
export function readFitsFile(path: string, opts: ReadFitsFileOptions = {}): FitsFile {
  return readFits(readFitsBytes(path, opts), { fileName: path, verifyChecksums: opts.verifyChecksums });
}
