/**
 * A whole build with nothing changed since the last one into the same output
 * (generators/pipeline/build-stamp.ts): the output's files are verified by their SHA-256 and left
 * in place (not rewritten: same inode, same mtime), and the tree equals a clean build's. Any
 * edit of an output file, any change under the content tree, a damaged record or --no-cache
 * means a real build, whose output equals the clean build again (node:crypto SHA-256 of every
 * file, tests/pipeline/helpers.ts treeDigest).
 */
import { appendFileSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { kiln, treeDigest, workspace } from './helpers.ts';
import { buildKey, stampFile, treeDigest as stampDigest } from '../../generators/pipeline/build-stamp.ts';

const UNCHANGED = /nothing changed: the (\d+) files in .* verified and left in place/;

describe('a build with nothing changed', () => {
  const ws = workspace();
  afterAll(() => ws.dispose());
  const cache = join(ws.dir, 'out.cache');
  const build = (...extra: string[]) => kiln('build', '--content', ws.content, '--out', ws.out, '--cache', cache, '--quiet', ...extra);
  let clean: Record<string, string> = {};

  it('leaves the verified output in place: no file rewritten, the same tree as the build that wrote it', () => {
    const first = build();
    expect(first.status, first.stderr).toBe(0);
    expect(first.stdout).not.toMatch(UNCHANGED);
    clean = treeDigest(ws.out);
    const index = join(ws.out, 'index.json');
    const before = statSync(index);
    const again = build();
    expect(again.status, again.stderr).toBe(0);
    const m = again.stdout.match(UNCHANGED);
    expect(m, again.stdout).not.toBeNull();
    expect(Number(m![1])).toBe(Object.keys(clean).length);
    // The counts of the recorded build are reported again (the demo: 4 releases, 2 of them built from 4 jobs).
    expect(again.stdout).toMatch(/^kiln build: 4 releases, \d+ products \(0 jobs built, 4 from cache\)/);
    const after = statSync(index);
    expect(after.ino).toBe(before.ino);
    expect(after.mtimeMs).toBe(before.mtimeMs);
    expect(treeDigest(ws.out)).toEqual(clean);
  });

  it('an edited or an added output file: a real build, which restores the clean tree', () => {
    const file = join(ws.out, 'index.json');
    writeFileSync(file, readFileSync(file, 'utf8').replace('"releases"', '"Releases"'));
    const edited = build();
    expect(edited.status, edited.stderr).toBe(0);
    expect(edited.stdout).not.toMatch(UNCHANGED);
    expect(treeDigest(ws.out)).toEqual(clean);
    writeFileSync(join(ws.out, 'stray.txt'), 'not from a build');
    const added = build();
    expect(added.stdout).not.toMatch(UNCHANGED);
    expect(treeDigest(ws.out)).toEqual(clean);
    // Back in step: nothing changed again.
    expect(build().stdout).toMatch(UNCHANGED);
  });

  it('a change anywhere under the content tree, --no-cache, or a damaged record: a real build', () => {
    appendFileSync(join(ws.content, 'README.md'), '\nA line added by a test.\n');
    const changed = build();
    expect(changed.status, changed.stderr).toBe(0);
    expect(changed.stdout).not.toMatch(UNCHANGED);
    expect(changed.stdout).toMatch(/\(0 jobs built, 4 from cache\)/);
    expect(build().stdout).toMatch(UNCHANGED);
    expect(build('--no-cache').stdout).toMatch(/\(4 jobs built, 0 from cache\)/);
    // This output's record (the cache seeded from the demo build holds the record of .kiln/out too).
    const record = stampFile(cache, ws.out);
    const text = readFileSync(record, 'utf8');
    const damagedText = text.replace('"files\\":', '"files\\": ');
    expect(damagedText).not.toBe(text);
    writeFileSync(record, damagedText);
    const damaged = build();
    expect(damaged.status, damaged.stderr).toBe(0);
    expect(damaged.stdout).not.toMatch(UNCHANGED);
    expect(treeDigest(ws.out)).toEqual(clean);
  });
});

describe('build key and tree digest', () => {
  const ws = workspace({ cache: 'cold' });
  afterAll(() => ws.dispose());

  it('the key follows every byte of the content tree and the generator version', () => {
    const k = buildKey(ws.content, 'kiln 0.1.0+a');
    expect(k).toMatch(/^[0-9a-f]{64}$/);
    expect(buildKey(ws.content, 'kiln 0.1.0+a')).toBe(k);
    expect(buildKey(ws.content, 'kiln 0.1.0+b')).not.toBe(k);
    const rel = 'README.md';
    const t = ws.read(rel);
    ws.write(rel, t.replace(/.$/s, (c) => (c === ' ' ? '!' : ' ')));
    expect(buildKey(ws.content, 'kiln 0.1.0+a')).not.toBe(k);
    ws.write(rel, t);
    expect(buildKey(ws.content, 'kiln 0.1.0+a')).toBe(k);
  });

  it('a file moved to another name changes the digest (paths are part of it); a missing folder has none', () => {
    const a = stampDigest(ws.content)!;
    const t = ws.read('README.md');
    writeFileSync(ws.path('README.md'), '');
    writeFileSync(ws.path('README2.md'), t);
    const b = stampDigest(ws.content)!;
    expect(b.sha256).not.toBe(a.sha256);
    expect(b.bytes).toBe(a.bytes);
    expect(stampDigest(join(ws.dir, 'no-such-folder'))).toBeNull();
  });
});
