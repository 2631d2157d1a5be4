/**
 * One writer per place: a lock file created exclusively (O_EXCL) beside the directory a step
 * writes (a build's --out, the site's dist/, a content tree's archive/). A second kiln refuses at
 * once with one line naming the holder. A lock whose process is gone (killed) is taken over.
 */
import { closeSync, openSync, readFileSync, unlinkSync, writeSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { hostname } from 'node:os';
import { EXIT, KilnEnvironmentError } from '../errors.ts';

export interface Lock {
  file: string;
  release(): void;
}

/** Lock file guarding `target` (a directory path). */
export function lockFileOf(target: string): string {
  return join(dirname(target), `.${basename(target)}.lock`);
}

function holderOf(file: string): { pid: number; host: string; what: string } | null {
  try {
    const v = JSON.parse(readFileSync(file, 'utf8')) as { pid?: unknown; host?: unknown; what?: unknown };
    return typeof v.pid === 'number' ? { pid: v.pid, host: String(v.host ?? ''), what: String(v.what ?? '') } : null;
  } catch {
    return null; // being written right now, or garbage
  }
}

export function processAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/** Takes the lock of `target` for `what` ("kiln build", …) or throws a one-line busy error. */
export function acquireLock(target: string, what: string): Lock {
  const file = lockFileOf(target);
  for (let attempt = 0; attempt < 2; attempt++) {
    try {
      const fd = openSync(file, 'wx');
      try {
        writeSync(fd, JSON.stringify({ pid: process.pid, host: hostname(), what, since: new Date().toISOString() }) + '\n');
      } finally {
        closeSync(fd);
      }
      let held = true;
      return {
        file,
        release() {
          if (!held) return;
          held = false;
          const h = holderOf(file);
          if (h && h.pid === process.pid) unlinkSync(file);
        },
      };
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code !== 'EEXIST') throw e;
      const h = holderOf(file);
      const sameHost = !h || h.host === hostname();
      if (h && sameHost && !processAlive(h.pid) && attempt === 0) {
        // Left by a killed kiln: take it over (re-read first so a fresh lock is never removed).
        const again = holderOf(file);
        if (again && again.pid === h.pid) unlinkSync(file);
        continue;
      }
      throw new KilnEnvironmentError(
        `${h ? `${h.what || 'another kiln'} (pid ${h.pid}${sameHost ? '' : ` on ${h.host}`})` : 'another kiln'} is writing here`,
        { file, todo: `wait for it to finish; if no kiln is running, remove ${basename(file)}` },
        EXIT.busy,
      );
    }
  }
  throw new KilnEnvironmentError('lock could not be taken', { file, todo: 'run the command again' }, EXIT.busy);
}

/** Runs `fn` holding the lock of `target`. */
export async function withLock<T>(target: string, what: string, fn: () => Promise<T>): Promise<T> {
  const lock = acquireLock(target, what);
  try {
    return await fn();
  } finally {
    lock.release();
  }
}
