/**
 * Gating: a candidate that fails a check refuses the whole build (exit 1, check ids named,
 * nothing written); the same release as a draft builds and shows its failures.
 */
import { cpSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { kiln, stagingLeft, treeDigest, workspace, type Workspace } from './helpers.ts';

const CANDIDATE = '2.0.0';
const LINEFITS = `releases/${CANDIDATE}/linefits/fi0.csv`;
/**
 * Mn Ka (5.895 keV, X-ray data booklet table 1-2, from memory, ±1 eV) FWHM 140.16 → 200 eV.
 * The Fano limit 2.355·sqrt(F·w·E) with F = 0.118 and w = 3.68 eV (instrument.yaml; Si values of
 * common practice) is ≈ 119 eV at 5.9 keV, so the value is physical and loads; it is ≈ 60 eV
 * (≈ 100 quoted σ of 0.60 eV) away from any FWHM law through the other lines.
 */
const BAD_LINE = { from: /^Mn Ka,5\.8950,5\.90794,0\.36,140\.16,/m, to: 'Mn Ka,5.8950,5.90794,0.36,200.00,' };

const spaces: Workspace[] = [];
afterAll(() => spaces.forEach((w) => w.dispose()));

function failingCandidate(): Workspace {
  const ws = workspace();
  spaces.push(ws);
  ws.replace(LINEFITS, BAD_LINE.from, BAD_LINE.to);
  return ws;
}

describe('a candidate with a failing check', () => {
  it('refuses the build with exit 1 naming the check ids, writes nothing, previous out intact', () => {
    // Previous output: the unmodified demo, built into this workspace's out dir.
    const good = workspace();
    spaces.push(good);
    const first = kiln('build', '--content', good.content, '--out', good.out, '--quiet');
    expect(first.status, first.stderr).toBe(0);
    const ws = failingCandidate();
    cpSync(good.out, ws.out, { recursive: true });
    const before = treeDigest(ws.out);

    const r = kiln('build', '--content', ws.content, '--out', ws.out, '--quiet');
    expect(r.status).toBe(1);
    expect(r.stderr).not.toMatch(/^\s+at /m);
    expect(r.stderr).toMatch(/refused, nothing written/);
    // The refusal lists each failure with its numbers: measured against allowed (the line fit
    // was set to 200 eV, the matrix keeps the law's ≈140 eV, so Δ ≈ −60 eV against ±2 eV).
    expect(r.stderr).toMatch(/release 2\.0\.0 \(candidate\) fails \d+ checks?:\n/);
    expect(r.stderr).toMatch(/^ {2}FAIL +closure\.fwhm\.mn-ka \[fi0-rmf\] +measured -[5-6]\d(\.\d+)? eV, allowed [\d.]+ eV: /m);
    expect(r.stdout).toBe('');
    expect(treeDigest(ws.out)).toEqual(before);
    expect(stagingLeft(ws.out)).toEqual([]);
  });

  it('with no previous output, the refused build creates no out dir', () => {
    const ws = failingCandidate();
    const r = kiln('build', '--content', ws.content, '--out', ws.out, '--quiet');
    expect(r.status).toBe(1);
    expect(() => readFileSync(join(ws.out, 'index.json'))).toThrow();
    expect(stagingLeft(ws.out)).toEqual([]);
  });

  it('as a draft it builds (exit 0) and its validation.json lists the failures', () => {
    const ws = failingCandidate();
    ws.replace(`releases/${CANDIDATE}/release.yaml`, /^status: candidate$/m, 'status: draft');
    const r = kiln('build', '--content', ws.content, '--out', ws.out, '--quiet');
    expect(r.status, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/failed checks in draft releases/);
    const v = JSON.parse(readFileSync(join(ws.out, 'releases', CANDIDATE, 'validation.json'), 'utf8')) as { release: string; checks: { id: string; status: string; product?: string }[] };
    expect(v.release).toBe(CANDIDATE);
    const failed = v.checks.filter((c) => c.status === 'fail');
    expect(failed.map((c) => c.id)).toContain('closure.fwhm.mn-ka');
    // Only detector fi0 was edited: bi1's checks all pass or are for review.
    expect(failed.every((c) => !c.product || c.product.startsWith('fi0'))).toBe(true);
    const index = JSON.parse(readFileSync(join(ws.out, 'index.json'), 'utf8'));
    const entry = index.releases.find((x: { id: string }) => x.id === CANDIDATE);
    expect(entry.status).toBe('draft');
    expect(entry.checks.fail).toBe(failed.length);
  });
});
