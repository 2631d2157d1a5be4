/** The stale-build guard of the site and browser tests (tests/support/fresh-build.ts) on a scratch tree. */
import { mkdirSync, mkdtempSync, rmSync, utimesSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { newestInput, requireFreshBuild, requireFreshOutput } from '../support/fresh-build.ts';
import { buildKey, treeDigest, writeBuildStamp } from '../../generators/pipeline/build-stamp.ts';
import { generatorVersion } from '../../generators/pipeline/generator-version.ts';

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

describe('requireFreshOutput', () => {
  it('an output older than an input is still fresh when its build record matches the content and today\'s generator; not once an output file changed', () => {
    const tree = mkdtempSync(join(tmpdir(), 'kiln-fresh-out-'));
    try {
      const out = join(tree, '.kiln', 'out');
      const marker = join(out, 'index.json');
      touch(marker, 300);
      touch(join(tree, 'content', 'releases', 'r', 'release.yaml'), 10);
      expect(() => requireFreshOutput('the output', marker, tree)).toThrow(/the output is stale: content\/releases\/r\/release\.yaml changed/);
      writeBuildStamp(join(tree, '.kiln', 'cache'), { outDir: out, key: buildKey(join(tree, 'content'), generatorVersion())!, output: treeDigest(out)!, summary: {} });
      expect(() => requireFreshOutput('the output', marker, tree)).not.toThrow();
      writeFileSync(marker, 'y');
      const old = Date.now() / 1000 - 300;
      utimesSync(marker, old, old);
      expect(() => requireFreshOutput('the output', marker, tree)).toThrow(/stale/);
    } finally {
      rmSync(tree, { recursive: true, force: true });
    }
  });
});
