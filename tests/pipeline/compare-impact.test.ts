/**
 * `kiln compare A B --impact`: for any pair of built releases, the reference sources simulated
 * with B's responses and fitted with both. For the pair the build itself reviews (2.0.0 supersedes
 * 1.1.0) the result must be the build's own spectral.json impact, number for number, since both
 * run the same seeded simulation and fits; the fits themselves are checked against scipy in
 * tests/spectrum/scipy.test.ts.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { expectOneLine, kiln, workspace, type Workspace } from './helpers.ts';

let ws: Workspace;
beforeAll(() => {
  ws = workspace();
  const r = kiln('build', '--content', ws.content, '--out', ws.out, '--quiet');
  if (r.status !== 0) throw new Error(r.stderr);
}, 300_000);
afterAll(() => ws?.dispose());

describe('kiln compare --impact', () => {
  it('gives the build\'s impact for the pair the build reviews, and exit 1 when some of it needs review', () => {
    const r = kiln('compare', '1.1.0', '2.0.0', '--out', ws.out, '--impact', '--content', ws.content, '--json');
    const built = JSON.parse(readFileSync(join(ws.out, 'releases', '2.0.0', 'spectral.json'), 'utf8')) as { comparedWith: string; impact: { parameters: { review: boolean }[]; bands: { review: boolean }[] }[] };
    expect(built.comparedWith).toBe('1.1.0');
    const got = JSON.parse(r.stdout) as { impact: { release: string; comparedWith: string; impact: unknown[] } };
    expect(got.impact.release).toBe('2.0.0');
    expect(got.impact.comparedWith).toBe('1.1.0');
    expect(got.impact.impact).toEqual(built.impact);
    const review = built.impact.some((im) => im.parameters.some((p) => p.review) || im.bands.some((b) => b.review));
    expect(r.status).toBe(review ? 1 : 0);
    const text = kiln('compare', '1.1.0', '2.0.0', '--out', ws.out, '--impact', '--content', ws.content);
    expect(text.stdout).toMatch(/^Impact on the reference sources: simulated with 2\.0\.0, fitted with 2\.0\.0 and 1\.1\.0/m);
    expect(text.stdout).toMatch(/^ {4}(REVIEW|within) {2}pl\.photonIndex: /m);
  }, 300_000);

  it('--impact with two files, or --content without --impact: exit 2, one line', () => {
    const f = join(ws.out, 'releases', '2.0.0', 'files');
    const a = kiln('compare', join(f, 'quillon-tarncam_fi0_2.0.0.rmf.gz'), join(f, 'quillon-tarncam_bi1_2.0.0.rmf.gz'), '--impact');
    expect(a.status).toBe(2);
    expect(expectOneLine(a.stderr)).toMatch(/--impact compares two releases/);
    const b = kiln('compare', '1.1.0', '2.0.0', '--out', ws.out, '--content', ws.content);
    expect(b.status).toBe(2);
    expect(expectOneLine(b.stderr)).toMatch(/--content goes with --impact/);
  });
});
