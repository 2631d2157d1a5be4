/**
 * Incremental rebuilds (`.kiln/cache`): a job whose fingerprint (resolved model, grids, generator
 * version) is unchanged reuses its cached output; the result is byte for byte what a build
 * without the cache writes (compared with node:crypto SHA-256 over every file); a changed
 * detector rebuilds the jobs of its release only (every product's HISTORY records the SHA-256 of
 * its release's model document, so one detector's change reaches all of that release's
 * products), other releases' jobs come from the cache; a corrupted entry is found by its hash, named in one line and
 * rebuilt (jobs, spectral sections and re-examinations alike); a deleted cache is rebuilt. The demo's candidate is made a draft so that an edited
 * model may fail closure checks without refusing the build.
 */
import { readdirSync, readFileSync, rmSync, writeFileSync, existsSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { kiln, treeDigest, workspace } from './helpers.ts';

const RELEASE = 'releases/2.0.0/release.yaml';

describe('job cache', () => {
  const ws = workspace({ cache: 'cold' });
  afterAll(() => ws.dispose());
  ws.replace(RELEASE, /^status: candidate$/m, 'status: draft');
  const cache = join(ws.dir, 'cache');
  const build = (out: string, ...extra: string[]) => kiln('build', '--content', ws.content, '--out', join(ws.dir, out), '--cache', cache, ...extra);
  const digest = (out: string) => treeDigest(join(ws.dir, out));

  it('a rebuild with nothing changed takes every job from the cache and writes the same bytes as a clean build', () => {
    const clean = build('clean', '--no-cache');
    expect(clean.status, clean.stderr).toBe(0);
    // Two built releases (2.0.0, 2.1.0) of two detectors each; the archives build no jobs.
    expect(clean.stdout).toMatch(/\(4 jobs built, 0 from cache\)/);
    const again = build('again');
    expect(again.status, again.stderr).toBe(0);
    expect(again.stdout).toMatch(/\(0 jobs built, 4 from cache\)/);
    // The spectral sections (predictions and impact fits) of all four releases are reused too.
    expect(again.stderr.match(/spectral predictions and impact from cache/g)).toHaveLength(4);
    // So are the re-examinations of the two archived releases (today's checks on archived bytes).
    expect(again.stderr.match(/re-examined with current checks \(from cache\)/g)).toHaveLength(2);
    expect(digest('again')).toEqual(digest('clean'));
  });

  it('a changed detector model rebuilds the jobs of its release only; output equals a clean build of the changed tree', () => {
    ws.replace(RELEASE, 'readNoiseE: 3.9,', 'readNoiseE: 3.92,');
    const inc = build('inc');
    expect(inc.status, inc.stderr).toBe(0);
    expect(inc.stdout).toMatch(/\(2 jobs built, 2 from cache\)/);
    expect(inc.stderr).toMatch(/release 2\.0\.0 \(draft\): detector fi0 built/);
    expect(inc.stderr).toMatch(/release 2\.0\.0 \(draft\): detector bi1 built/);
    expect(inc.stderr).toMatch(/release 2\.1\.0 \(candidate\): detector fi0 from cache/);
    expect(inc.stderr).toMatch(/release 2\.1\.0 \(candidate\): detector bi1 from cache/);
    const clean = build('clean2', '--no-cache');
    expect(clean.status, clean.stderr).toBe(0);
    expect(digest('inc')).toEqual(digest('clean2'));
    expect(digest('inc')).not.toEqual(digest('clean'));
  });

  it('a corrupted entry is detected by its hash, named in one line and rebuilt; same bytes', () => {
    const root = join(cache, 'jobs');
    const entries = readdirSync(root).filter((n) => /^[0-9a-f]{64}$/.test(n));
    // The four current entries (2.0.0's two replaced ones were pruned).
    expect(entries.length).toBe(4);
    const meta = JSON.parse(readFileSync(join(root, entries[0], 'meta.json'), 'utf8')) as { job: string; files: { name: string }[] };
    const file = join(root, entries[0], 'files', meta.files[0].name);
    const b = readFileSync(file);
    b[b.length >> 1] ^= 0x01;
    writeFileSync(file, b);
    const r = build('corrupt', '--quiet');
    expect(r.status, r.stderr).toBe(0);
    const lines = r.stderr.trim().split('\n');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toContain(`cache entry of job ${meta.job}`);
    expect(lines[0]).toContain(`files/${meta.files[0].name} does not match its SHA-256; rebuilding it`);
    expect(r.stdout).toMatch(/\(1 jobs built, 3 from cache\)/);
    expect(digest('corrupt')).toEqual(digest('clean2'));
    // The rebuilt entry replaced the corrupted one.
    const again = build('again2', '--quiet');
    expect(again.stderr).toBe('');
    expect(again.stdout).toMatch(/\(0 jobs built, 4 from cache\)/);
  });

  it('a tampered meta.json is refused by the entry seal; a deleted cache is simply rebuilt', () => {
    const root = join(cache, 'jobs');
    const entry = readdirSync(root).filter((n) => /^[0-9a-f]{64}$/.test(n))[0];
    const metaFile = join(root, entry, 'meta.json');
    writeFileSync(metaFile, readFileSync(metaFile, 'utf8').replace('"nnz":', '"nnz": '));
    const r = build('meta', '--quiet');
    expect(r.status, r.stderr).toBe(0);
    expect(r.stderr).toMatch(/rejected: meta\.json does not match its SHA-256 in entry\.json; rebuilding it/);
    // A spectral entry whose document was edited is refused by its SHA-256 and recomputed.
    const spectralDir = join(cache, 'spectral');
    const sp = join(spectralDir, readdirSync(spectralDir)[0]);
    writeFileSync(sp, readFileSync(sp, 'utf8').replace('"predicted', '"Predicted'));
    const rs = build('spectral', '--quiet');
    expect(rs.status, rs.stderr).toBe(0);
    expect(rs.stderr).toMatch(/cache entry of the spectral section of release [\d.]+ \([0-9a-f]{12}\) rejected: document does not match its SHA-256; recomputing it/);
    expect(digest('spectral')).toEqual(digest('clean2'));
    // So is an edited re-examination entry.
    const reDir = join(cache, 'reexamined');
    const re = join(reDir, readdirSync(reDir)[0]);
    writeFileSync(re, readFileSync(re, 'utf8').replace('"findings', '"Findings'));
    const rr = build('reexamined', '--quiet');
    expect(rr.status, rr.stderr).toBe(0);
    expect(rr.stderr).toMatch(/cache entry of the re-examination of release [\d.]+ \([0-9a-f]{12}\) rejected: document does not match its SHA-256; recomputing it/);
    expect(digest('reexamined')).toEqual(digest('clean2'));
    rmSync(cache, { recursive: true, force: true });
    const fresh = build('fresh', '--quiet');
    expect(fresh.status, fresh.stderr).toBe(0);
    expect(fresh.stdout).toMatch(/\(4 jobs built, 0 from cache\)/);
    expect(existsSync(join(cache, 'jobs'))).toBe(true);
    expect(digest('fresh')).toEqual(digest('clean2'));
  });
});
