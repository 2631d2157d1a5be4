/** The stale-build guard of the site and browser tests (tests/support/fresh-build.ts) on a scratch tree. */
import { mkdirSync, mkdtempSync, rmSync, utimesSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { newestInput, requireFreshBuild } from '../support/fresh-build.ts';

const root = mkdtempSync(join(tmpdir(), 'kiln-fresh-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

const touch = (p: string, secondsAgo: number) => {
  mkdirSync(join(p, '..'), { recursive: true });
  writeFileSync(p, 'x');
  const t = Date.now() / 1000 - secondsAgo;
  utimesSync(p, t, t);
};

describe('requireFreshBuild', () => {
  it('accepts a build newer than every input, refuses one older than any, and a missing one', () => {
    touch(join(root, 'content', 'releases', 'r', 'release.yaml'), 300);
    touch(join(root, 'src', 'pages', 'index.astro'), 200);
    const marker = join(root, 'dist', 'index.html');
    touch(marker, 100);
    expect(newestInput(root).file).toBe(join('src', 'pages', 'index.astro'));
    expect(() => requireFreshBuild(marker, 'dist/', root)).not.toThrow();
    touch(join(root, 'generators', 'physics', 'arf.ts'), 10);
    try {
      requireFreshBuild(marker, 'dist/', root);
      expect.unreachable('a build older than generators/physics/arf.ts must be refused');
    } catch (e) {
      expect(String((e as Error).message)).toMatch(/dist\/ is stale: generators\/physics\/arf\.ts changed 9\d s after dist\/index\.html was built/);
    }
    try {
      requireFreshBuild(join(root, 'nothing', 'index.html'), 'dist/', root);
      expect.unreachable('a missing build must be refused');
    } catch (e) {
      expect(String((e as Error).message)).toMatch(/missing/);
    }
  });
});
