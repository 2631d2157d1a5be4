/**
 * The output swap (pipeline/atomic.ts) at the level of its file-system steps. The property: at
 * every instant the previous complete tree is either at the target or in its side directory,
 * where the next build's first step (recoverInterruptedSwap) puts it back; so a failure in the
 * middle of a swap never loses the previous output. POSIX rename(2) replaces a name atomically
 * (IEEE Std 1003.1, rename): the only tool a swap may use on the old tree before the new one is in.
 */
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { recoverInterruptedSwap, removeStaleStaging, stagingDir, swapInto, writeFileDurable } from '../../generators/pipeline/atomic.ts';

const dirs: string[] = [];
afterEach(() => dirs.splice(0).forEach((d) => rmSync(d, { recursive: true, force: true })));

function scratch(): string {
  const d = mkdtempSync(join(tmpdir(), 'kiln-atomic-'));
  dirs.push(d);
  return d;
}

function tree(dir: string, marker: string): void {
  mkdirSync(join(dir, 'releases'), { recursive: true });
  writeFileSync(join(dir, 'index.json'), marker);
  writeFileSync(join(dir, 'releases', 'a.txt'), `${marker}-a`);
}

describe('swapInto', () => {
  it('replaces the target by the staged tree and leaves no side directory', () => {
    const root = scratch();
    const out = join(root, 'out');
    tree(out, 'old');
    const staging = stagingDir(out);
    tree(staging, 'new');
    swapInto(staging, out);
    expect(readFileSync(join(out, 'index.json'), 'utf8')).toBe('new');
    expect(readFileSync(join(out, 'releases', 'a.txt'), 'utf8')).toBe('new-a');
    expect(readdirSync(root)).toEqual(['out']);
  });

  it('a swap that fails after the old tree moved aside loses nothing: the next build restores it', () => {
    const root = scratch();
    const out = join(root, 'out');
    tree(out, 'old');
    // The staged tree vanished (disk full, a killed writer, a concurrent cleanup): renaming it in fails.
    const missing = join(root, '.out.staging-999999');
    try {
      swapInto(missing, out);
      expect.unreachable('a swap from a missing staging directory must throw');
    } catch (e) {
      expect((e as NodeJS.ErrnoException).code).toBe('ENOENT');
    }
    // What the next build does first (build.ts): repair an interrupted swap.
    recoverInterruptedSwap(out);
    expect(readFileSync(join(out, 'index.json'), 'utf8')).toBe('old');
    expect(readFileSync(join(out, 'releases', 'a.txt'), 'utf8')).toBe('old-a');
  });

  it('into a target that does not exist yet, it creates it (and its parents)', () => {
    const root = scratch();
    const out = join(root, 'deep', 'out');
    const staging = join(root, 'staged');
    tree(staging, 'first');
    swapInto(staging, out);
    expect(readFileSync(join(out, 'index.json'), 'utf8')).toBe('first');
    expect(existsSync(staging)).toBe(false);
  });
});

describe('recoverInterruptedSwap', () => {
  it('puts the previous tree back when the target is missing, and drops a leftover side directory otherwise', () => {
    const root = scratch();
    const out = join(root, 'out');
    tree(join(root, '.out.previous'), 'old');
    recoverInterruptedSwap(out);
    expect(readFileSync(join(out, 'index.json'), 'utf8')).toBe('old');
    expect(existsSync(join(root, '.out.previous'))).toBe(false);
    tree(join(root, '.out.previous'), 'older');
    recoverInterruptedSwap(out);
    expect(readFileSync(join(out, 'index.json'), 'utf8')).toBe('old');
    expect(existsSync(join(root, '.out.previous'))).toBe(false);
  });
});

describe('staging directories', () => {
  it('stagingDir is an empty directory beside the target, named for this process', () => {
    const root = scratch();
    const out = join(root, 'out');
    const s1 = stagingDir(out);
    writeFileSync(join(s1, 'leftover'), 'x');
    const s2 = stagingDir(out);
    expect(s2).toBe(join(root, `.out.staging-${process.pid}`));
    expect(readdirSync(s2)).toEqual([]);
  });

  it('removeStaleStaging removes dead builds\' staging, keeps a live one and anything not ours', () => {
    const root = scratch();
    const out = join(root, 'out');
    // pid 2^22 + 1 is above Linux's pid_max limit (PID_MAX_LIMIT = 2^22, linux/threads.h): never alive.
    const dead = join(root, `.out.staging-${2 ** 22 + 1}`);
    const live = join(root, `.out.staging-${process.ppid}`);
    const mine = join(root, `.out.staging-${process.pid}`);
    const other = join(root, '.other.staging-1');
    for (const d of [dead, live, mine, other]) mkdirSync(d);
    removeStaleStaging(out);
    expect(existsSync(dead)).toBe(false);
    expect(existsSync(mine)).toBe(false);
    expect(existsSync(live)).toBe(true);
    expect(existsSync(other)).toBe(true);
    removeStaleStaging(join(root, 'no-such-parent', 'out'));
  });
});

describe('writeFileDurable', () => {
  it('writes the bytes through a temporary file that does not stay behind', () => {
    const root = scratch();
    const p = join(root, 'sub', 'f.bin');
    writeFileDurable(p, Uint8Array.of(1, 2, 3));
    writeFileDurable(p, 'text');
    expect(readFileSync(p, 'utf8')).toBe('text');
    expect(readdirSync(join(root, 'sub'))).toEqual(['f.bin']);
  });
});
