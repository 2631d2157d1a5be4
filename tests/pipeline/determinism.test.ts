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
  const ws = workspace({ cache: 'cold' });
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

/** Built once and shared: the second test compares a third build against the second one. */
let workersTwo: Map<string, Buffer> | null = null;

describe('kiln build is deterministic', () => {
  it('two builds (different content and output paths) give byte-identical trees, --workers 1 vs --workers 2', () => {
    const one = buildTree('1', 'out-a');
    const two = buildTree('2', 'site-b');
    workersTwo = two;
    // 38 products + 4 × 5 JSON files (manifest, validation, summary, spectral, spectral-elements) + index.json for the demo (content/releases/*/release.yaml), 2 × 2
    // model documents and schemas (built releases 2.0.0 and 2.1.0; the archives of 1.0.0 and 1.1.0 predate them),
    // a reexamined.json for each of the 2 archived releases (content/archive/),
    // plus the split site data: 5 documents per detector and one per epoch, an overlay per release, a
    // supplement per detector of an archived release (the curves its site data predate), and a finder manifest and one chunk per detector (the demo's files fit in one).
    const summaries = [...one.keys()].filter((p) => p.endsWith('/summary.json')).map((p) => JSON.parse(one.get(p)!.toString('utf8')) as { detectors: { epochs: unknown[] }[] });
    const split = summaries.reduce((n, s) => n + s.detectors.reduce((m, d) => m + 5 + d.epochs.length, 0), 0);
    const finder = [...one.keys()].filter((p) => p.startsWith('finder/')).length;
    expect(finder).toBe(4);
    const overlays = summaries.length;
    const supplements = [...one.keys()].filter((p) => p.endsWith('/supplement.json'));
    expect(supplements.map((p) => p.split('/')[1]).sort()).toEqual(['1.0.0', '1.0.0', '1.1.0', '1.1.0']);
    expect(one.size).toBe(38 + 20 + 4 + 1 + 2 + split + overlays + supplements.length + finder);
    expectSameTrees(one, two);
  }, 300_000); // two clean demo builds (impact fits included): ~30 s each on 2 loaded cores

  it('repeated builds with the same worker count are byte-identical too', () => {
    // Three clean builds in all (the suite's budget): this one repeats the second one's settings.
    const a = workersTwo ?? buildTree('2', 'out');
    const b = buildTree('2', 'out');
    expectSameTrees(a, b);
  }, 300_000);
});
