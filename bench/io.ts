/** Node file helpers of the bench: durable writes and the bytes of a directory tree. */
import { closeSync, fsyncSync, openSync, readdirSync, readFileSync, statSync, writeSync } from 'node:fs';
import { join } from 'node:path';

/** Writes `bytes` to `path` and fsyncs it, so the time includes getting the bytes to the disk. */
export function writeFileSynced(path: string, bytes: Uint8Array): void {
  const fd = openSync(path, 'w');
  try {
    let off = 0;
    while (off < bytes.length) off += writeSync(fd, bytes, off, bytes.length - off);
    fsyncSync(fd);
  } finally {
    closeSync(fd);
  }
}

/** All regular files under `dir` (sorted, recursive). */
export function filesUnder(dir: string): string[] {
  const out: string[] = [];
  const walk = (d: string) => {
    for (const e of readdirSync(d, { withFileTypes: true }).sort((a, b) => (a.name < b.name ? -1 : 1))) {
      const p = join(d, e.name);
      if (e.isDirectory()) walk(p);
      else if (e.isFile()) out.push(p);
    }
  };
  walk(dir);
  return out;
}

export function totalSize(paths: readonly string[]): number {
  return paths.reduce((s, p) => s + statSync(p).size, 0);
}

/** The files concatenated, zero-padded to a multiple of 4 bytes (what the ones'-complement sum needs). */
export function concatPadded(paths: readonly string[]): Uint8Array {
  const parts = paths.map((p) => readFileSync(p));
  const n = parts.reduce((s, b) => s + b.length, 0);
  const out = new Uint8Array(Math.ceil(n / 4) * 4);
  let off = 0;
  for (const b of parts) {
    out.set(b, off);
    off += b.length;
  }
  return out;
}
