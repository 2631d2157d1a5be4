/**
 * Determinism: the same content gives the same bytes, whatever the output path, the content
 * path or the number of worker threads. (Reproducible builds: common practice, no source.)
 */
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { kiln, readTree, workspace, type Workspace } from './helpers.ts';

const spaces: Workspace[] = [];
afterAll(() => spaces.forEach((w) => w.dispose()));

function buildTree(workers: string, outName: string): Map<string, Buffer> {
  const ws = workspace();
  spaces.push(ws);
  const out = join(ws.dir, outName);
  const r = kiln('build', '--content', ws.content, '--out', out, '--workers', workers, '--quiet');
  expect(r.status, r.stderr).toBe(0);
  return readTree(out);
}

function expectSameTrees(a: Map<string, Buffer>, b: Map<string, Buffer>): void {
  expect([...b.keys()]).toEqual([...a.keys()]);
  const differing = [...a.keys()].filter((p) => !a.get(p)!.equals(b.get(p)!));
  expect(differing).toEqual([]);
}

describe('kiln build is deterministic', () => {
  it('two builds (different content and output paths) give byte-identical trees, --workers 1 vs --workers 2', () => {
    const one = buildTree('1', 'out-a');
    const two = buildTree('2', 'site-b');
    // 22 products + 3 × 4 JSON files (manifest, validation, site, spectral) + index.json for the demo.
    expect(one.size).toBe(22 + 12 + 1);
    expectSameTrees(one, two);
  });

  it('repeated builds with the same worker count are byte-identical too', () => {
    const a = buildTree('2', 'out');
    const b = buildTree('2', 'out');
    expectSameTrees(a, b);
  });
});
