/**
 * `kiln publish ID`: freezes a candidate into content/archive/<id>/ with a seal, flips only its
 * status line, never rewrites an archive, refuses drafts, and later builds serve it from the archive.
 */
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { expectOneLine, kiln, readTree, servedSite, sha256, treeDigest, workspace, type Workspace } from './helpers.ts';

const CANDIDATE = '2.0.0';
/** The demo candidate has review items against 1.1.0 (its planned soft-response change): publishing needs a sign-off. */
const SIGN_OFF = ['--accept-all', '--reason', 'planned soft-response change of the demo candidate'];
const YAML = `releases/${CANDIDATE}/release.yaml`;

const spaces: Workspace[] = [];
afterAll(() => spaces.forEach((w) => w.dispose()));
const fresh = () => {
  const ws = workspace();
  spaces.push(ws);
  return ws;
};

interface Seal {
  schema: string;
  release: string;
  inputsSha256: string;
  files: { path: string; bytes: number; sha256: string }[];
}

/** Canonical JSON (keys sorted, no spaces) written out here, not taken from Kiln's hash.ts. */
function canonical(v: unknown): string {
  if (v === null || typeof v !== 'object') return JSON.stringify(v);
  if (Array.isArray(v)) return `[${v.map(canonical).join(',')}]`;
  return `{${Object.keys(v as object).sort().map((k) => `${JSON.stringify(k)}:${canonical((v as Record<string, unknown>)[k])}`).join(',')}}`;
}

describe('kiln publish', () => {
  // Several builds of the four-release demo on a shared machine: more than the default minute.
  it('publishes a candidate, then refuses to publish it again, and the next build serves it from the archive', { timeout: 480_000 }, () => {
    const ws = fresh();
    // The candidate as built before publishing, for comparison.
    const pre = kiln('build', '--content', ws.content, '--out', join(ws.dir, 'pre'), ...ws.cacheArgs, '--quiet');
    expect(pre.status, pre.stderr).toBe(0);
    const yamlBefore = ws.read(YAML);

    const r = kiln('publish', CANDIDATE, '--content', ws.content, ...ws.cacheArgs, ...SIGN_OFF);
    expect(r.stderr).not.toMatch(/^\s+at /m);
    expect(r.status, r.stderr).toBe(0);
    const archive = ws.path(`archive/${CANDIDATE}`);
    expect(existsSync(join(archive, 'seal.json'))).toBe(true);

    // The seal describes every archived file, with sizes and SHA-256 of the bytes (node:crypto).
    const seal = JSON.parse(readFileSync(join(archive, 'seal.json'), 'utf8')) as Seal;
    // kiln/seal/2 (generators/pipeline/archive.ts): its own fields are covered by sealSha256,
    // the SHA-256 of its canonical JSON without that field (checked here with node:crypto).
    expect(seal.schema).toBe('kiln/seal/2');
    const { sealSha256, ...fields } = seal as Seal & { sealSha256: string };
    expect(sha256(Buffer.from(canonical(fields)))).toBe(sealSha256);
    expect(seal.release).toBe(CANDIDATE);
    const arch = readTree(archive);
    arch.delete('seal.json');
    expect(seal.files.map((f) => f.path).sort()).toEqual([...arch.keys()].sort());
    for (const f of seal.files) {
      expect(arch.get(f.path)!.length, f.path).toBe(f.bytes);
      expect(sha256(arch.get(f.path)!), f.path).toBe(f.sha256);
    }
    // 2 detectors × (1 RMF + 4 epoch ARFs) per content/releases/2.0.0/release.yaml.
    expect(seal.files.filter((f) => f.path.startsWith('files/')).length).toBe(10);
    // No staging directory left in archive/.
    expect(readdirSync(ws.path('archive')).sort()).toEqual(['1.0.0', '1.1.0', CANDIDATE]);

    // release.yaml: only the status line changed, candidate → published.
    const a = yamlBefore.split('\n');
    const b = ws.read(YAML).split('\n');
    expect(b.length).toBe(a.length);
    const changed = a.map((l, i) => [l, b[i]]).filter(([x, y]) => x !== y);
    expect(changed).toEqual([['status: candidate', 'status: published']]);

    // A second publish of the same id: exit 2, one line, nothing changes in the content tree.
    const contentBefore = treeDigest(ws.content);
    const again = kiln('publish', CANDIDATE, '--content', ws.content, ...ws.cacheArgs, '--quiet');
    expect(again.status).toBe(2);
    expect(expectOneLine(again.stderr)).toMatch(/already published/);
    expect(treeDigest(ws.content)).toEqual(contentBefore);

    // The next build serves 2.0.0 from the archive, with the very bytes built as a candidate.
    const built = kiln('build', '--content', ws.content, '--out', ws.out);
    expect(built.status, built.stderr).toBe(0);
    expect(built.stderr).toMatch(/release 2\.0\.0 \(published\): 10 archived products verified/);
    expect(built.stderr).not.toMatch(/release 2\.0\.0 .*detector .* built/);
    const out = readTree(ws.out);
    const preTree = readTree(join(ws.dir, 'pre'));
    for (const f of seal.files) {
      if (f.path === 'site.json') continue; // its status is the current one: compared below
      expect(out.get(`releases/${CANDIDATE}/${f.path}`)!.equals(arch.get(f.path)!), f.path).toBe(true);
      if (f.path.startsWith('files/')) expect(preTree.get(`releases/${CANDIDATE}/${f.path}`)!.equals(arch.get(f.path)!), f.path).toBe(true);
    }
    // Served site data: the archived one with the current status.
    const served = servedSite(ws.out, CANDIDATE);
    const archivedSite = JSON.parse(arch.get('site.json')!.toString('utf8'));
    expect(served.status).toBe('published');
    expect({ ...served, status: null }).toEqual({ ...archivedSite, status: null });
    const manifest = JSON.parse(out.get(`releases/${CANDIDATE}/manifest.json`)!.toString('utf8'));
    expect(manifest.status).toBe('published');
    expect(manifest.inputsSha256).toBe(seal.inputsSha256);
  });

  it('the archived site data records the release as published (what was frozen), not as a candidate', () => {
    const ws = fresh();
    const r = kiln('publish', CANDIDATE, '--content', ws.content, ...ws.cacheArgs, ...SIGN_OFF, '--quiet');
    expect(r.status, r.stderr).toBe(0);
    // archive.ts: site.json is "the site data of the release as published"; the demo archives
    // of 1.0.0 and 1.1.0 carry their status, so must a freshly published one.
    const site = JSON.parse(ws.read(`archive/${CANDIDATE}/site.json`));
    expect(site.status).toBe('published');
  });

  it('the manifest of a release is the same after publishing (only its status differs)', () => {
    const ws = fresh();
    const pre = kiln('build', '--content', ws.content, '--out', join(ws.dir, 'pre'), ...ws.cacheArgs, '--quiet');
    expect(pre.status, pre.stderr).toBe(0);
    expect(kiln('publish', CANDIDATE, '--content', ws.content, ...ws.cacheArgs, ...SIGN_OFF, '--quiet').status).toBe(0);
    const post = kiln('build', '--content', ws.content, '--out', ws.out, '--quiet');
    expect(post.status, post.stderr).toBe(0);
    const a = JSON.parse(readFileSync(join(ws.dir, 'pre', 'releases', CANDIDATE, 'manifest.json'), 'utf8'));
    const b = JSON.parse(readFileSync(join(ws.out, 'releases', CANDIDATE, 'manifest.json'), 'utf8'));
    expect(a.status).toBe('candidate');
    expect(b.status).toBe('published');
    // Files and fingerprint, then the fitted parameters: the frozen numbers must not change shape.
    expect(b.files).toEqual(a.files);
    expect(b.inputsSha256).toBe(a.inputsSha256);
    expect(Object.keys(b.parameters).sort()).toEqual(Object.keys(a.parameters).sort());
    expect(b.parameters).toEqual(a.parameters);
  });

  it('refuses to publish a draft (exit 2, names release.yaml and status) and writes nothing', () => {
    const ws = fresh();
    ws.replace(YAML, /^status: candidate$/m, 'status: draft');
    const before = treeDigest(ws.content);
    const r = kiln('publish', CANDIDATE, '--content', ws.content, ...ws.cacheArgs, ...SIGN_OFF, '--quiet');
    expect(r.status).toBe(2);
    const line = expectOneLine(r.stderr);
    expect(line).toContain(ws.path(YAML));
    expect(line).toMatch(/status/);
    expect(line).toMatch(/draft/);
    expect(treeDigest(ws.content)).toEqual(before);
    expect(existsSync(ws.path(`archive/${CANDIDATE}`))).toBe(false);
  });

  it('refuses an unknown release id (exit 2) and writes nothing', () => {
    const ws = fresh();
    const before = treeDigest(ws.content);
    const r = kiln('publish', '9.9.9', '--content', ws.content, ...ws.cacheArgs, '--quiet');
    expect(r.status).toBe(2);
    expect(expectOneLine(r.stderr)).toMatch(/9\.9\.9/);
    expect(treeDigest(ws.content)).toEqual(before);
  });

  it('refuses a candidate that fails a check (exit 1) and archives nothing', () => {
    const ws = fresh();
    // Mn Ka FWHM 140.16 → 200 eV: far from the fitted law, still above the Fano limit
    // (2.355·sqrt(F·w·E) ≈ 119 eV at 5.9 keV with F = 0.118, w = 3.68 eV; Fano, Phys. Rev. 72, 26 (1947) / common practice).
    ws.replace(`releases/${CANDIDATE}/linefits/fi0.csv`, /^Mn Ka,5\.8950,5\.90794,0\.36,140\.16,/m, 'Mn Ka,5.8950,5.90794,0.36,200.00,');
    const before = treeDigest(ws.content);
    const r = kiln('publish', CANDIDATE, '--content', ws.content, ...ws.cacheArgs, ...SIGN_OFF, '--quiet');
    expect(r.status).toBe(1);
    expect(r.stderr).toMatch(/closure\.fwhm\.mn-ka/);
    expect(treeDigest(ws.content)).toEqual(before);
  });
});
