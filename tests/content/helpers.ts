/** A scratch copy of the demo content tree, edited in place for bad-input cases. */
import { cpSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

export const REPO = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
export const DEMO_CONTENT = join(REPO, 'content');
export const INSTRUMENT = 'instruments/quillon-tarncam/instrument.yaml';
export const MIRROR = 'instruments/quillon-tarncam/mirror-area.csv';
export const rel = (id: string, f = 'release.yaml') => `releases/${id}/${f}`;

export interface Scratch {
  root: string;
  read(file: string): string;
  write(file: string, text: string): void;
  /** Replaces the first occurrence of `from` (which must exist: a missed edit would test nothing). */
  replace(file: string, from: string | RegExp, to: string): void;
  /** 1-based line of the first line containing `needle` (after edits). */
  lineOf(file: string, needle: string | RegExp): number;
  /** 1-based line of the last line starting with `prefix`. */
  lastLineStarting(file: string, prefix: string): number;
  remove(file: string): void;
  dispose(): void;
}

export function scratchCopy(): Scratch {
  const root = join(mkdtempSync(join(tmpdir(), 'kiln-content-')), 'content');
  cpSync(DEMO_CONTENT, root, { recursive: true });
  const p = (f: string) => join(root, f);
  const s: Scratch = {
    root,
    read: (f) => readFileSync(p(f), 'utf8'),
    write: (f, t) => writeFileSync(p(f), t),
    replace(f, from, to) {
      const t = s.read(f);
      const found = typeof from === 'string' ? t.includes(from) : from.test(t);
      if (!found) throw new Error(`test setup: ${String(from)} not found in ${f}`);
      s.write(f, t.replace(from, to));
    },
    lineOf(f, needle) {
      const i = s.read(f).split('\n').findIndex((l) => (typeof needle === 'string' ? l.includes(needle) : needle.test(l)));
      if (i < 0) throw new Error(`test setup: ${String(needle)} not found in ${f}`);
      return i + 1;
    },
    lastLineStarting(f, prefix) {
      const lines = s.read(f).split('\n');
      for (let i = lines.length - 1; i >= 0; i--) if (lines[i].startsWith(prefix)) return i + 1;
      throw new Error(`test setup: no line starting ${prefix} in ${f}`);
    },
    remove: (f) => rmSync(p(f), { recursive: true }),
    dispose: () => rmSync(dirname(root), { recursive: true, force: true }),
  };
  return s;
}
