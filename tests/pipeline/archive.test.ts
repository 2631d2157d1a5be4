/**
 * Published releases are frozen: a rebuild serves their archived bytes unchanged, and any
 * tampering with the archive or with the inputs they were published from stops the build
 * (exit 2, one line naming the file) without touching the previous output.
 */
import { cpSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { expectOneLine, kiln, readTree, servedSite, stagingLeft, treeDigest, workspace, type Workspace } from './helpers.ts';

const PUBLISHED = '1.1.0';
const SUPERSEDED = '1.0.0';
const ARF = `files/quillon-tarncam_fi0_e2_${PUBLISHED}.arf.gz`;
const RMF = `files/quillon-tarncam_bi1_${PUBLISHED}.rmf.gz`;
const LINEFITS = `releases/${PUBLISHED}/linefits/fi0.csv`;

interface Seal {
  release: string;
  files: { path: string; bytes: number; sha256: string }[];
}

let base: Workspace;
const spaces: Workspace[] = [];
beforeAll(() => {
  base = workspace();
  const r = kiln('build', '--content', base.content, '--out', base.out, '--quiet');
  if (r.status !== 0) throw new Error(`baseline build failed:\n${r.stderr}`);
});
afterAll(() => [base, ...spaces].forEach((w) => w?.dispose()));

/** A workspace whose out dir holds a copy of the baseline build (the "previous" output). */
function withPreviousOut(): { ws: Workspace; before: Record<string, string> } {
  const ws = workspace();
  spaces.push(ws);
  cpSync(base.out, ws.out, { recursive: true });
  return { ws, before: treeDigest(ws.out) };
}

function expectUntouched(ws: Workspace, before: Record<string, string>): void {
  expect(treeDigest(ws.out)).toEqual(before);
  expect(stagingLeft(ws.out)).toEqual([]);
}

describe('published releases survive a rebuild byte for byte', () => {
  it('the served products, site data and validation report equal the archived bytes', () => {
    const out = readTree(base.out);
    for (const id of [SUPERSEDED, PUBLISHED]) {
      const arch = readTree(base.path(`archive/${id}`));
      const seal = JSON.parse(arch.get('seal.json')!.toString('utf8')) as Seal;
      expect(seal.files.length).toBeGreaterThan(0);
      for (const f of seal.files) {
        // The archive keeps the whole-release site.json; the build serves it split (compared below).
        if (f.path === 'site.json') continue;
        const served = out.get(`releases/${id}/${f.path}`);
        expect(served, `${id}/${f.path}`).toBeDefined();
        expect(served!.equals(arch.get(f.path)!), `${id}/${f.path}`).toBe(true);
      }
      // Every served product is an archived one (nothing rebuilt beside them).
      const servedFiles = [...out.keys()].filter((p) => p.startsWith(`releases/${id}/files/`)).map((p) => p.slice(`releases/${id}/`.length));
      expect(servedFiles.sort()).toEqual(seal.files.map((f) => f.path).filter((p) => p.startsWith('files/')).sort());
      const manifest = JSON.parse(out.get(`releases/${id}/manifest.json`)!.toString('utf8')) as Seal;
      for (const m of manifest.files) expect(m.sha256).toBe(seal.files.find((f) => f.path === m.path)!.sha256);
      // The split documents join back into the archived site data, number for number.
      expect(servedSite(base.out, id)).toEqual(JSON.parse(arch.get('site.json')!.toString('utf8')));
    }
  });

  it('a tampered archived product (one byte) fails with exit 2 naming the file; the previous out is intact', () => {
    const { ws, before } = withPreviousOut();
    const file = ws.path(`archive/${PUBLISHED}/${ARF}`);
    const b = readFileSync(file);
    b[b.length >> 1] ^= 0x01;
    writeFileSync(file, b);
    const r = kiln('build', '--content', ws.content, '--out', ws.out);
    expect(r.status).toBe(2);
    const line = expectOneLine(r.stderr.split('\n').filter((l) => !/^kiln build: release /.test(l)).join('\n'));
    expect(line).toContain(file);
    expect(line).toMatch(/corrupt|altered/);
    expectUntouched(ws, before);
  });

  it('a missing archived file fails with exit 2 naming it', () => {
    const { ws, before } = withPreviousOut();
    const file = ws.path(`archive/${PUBLISHED}/${RMF}`);
    rmSync(file);
    const r = kiln('build', '--content', ws.content, '--out', ws.out, '--quiet');
    expect(r.status).toBe(2);
    const line = expectOneLine(r.stderr);
    expect(line).toContain(file);
    expect(line).toMatch(/missing/);
    expectUntouched(ws, before);
  });

  it('a changed line-fit value of a published release fails with exit 2 naming the changed file', () => {
    const { ws, before } = withPreviousOut();
    // Al Ka FWHM 86.77 eV → 86.78 eV: a tiny, physically harmless change is still a change.
    ws.replace(LINEFITS, /^Al Ka,1\.4867,1\.48835,0\.60,86\.77,/m, 'Al Ka,1.4867,1.48835,0.60,86.78,');
    const r = kiln('build', '--content', ws.content, '--out', ws.out, '--quiet');
    expect(r.status).toBe(2);
    const line = expectOneLine(r.stderr);
    expect(line).toContain(LINEFITS);
    expect(line).toContain(PUBLISHED);
    // Only that file is named as changed.
    expect(line).toMatch(/changed files: releases\/1\.1\.0\/linefits\/fi0\.csv\b(?!,)/);
    expectUntouched(ws, before);
  });

  it('a changed model override in release.yaml of a published release fails naming release.yaml', () => {
    const { ws, before } = withPreviousOut();
    const yaml = `releases/${PUBLISHED}/release.yaml`;
    ws.replace(yaml, 'readNoiseE: 3.9', 'readNoiseE: 3.8');
    const r = kiln('build', '--content', ws.content, '--out', ws.out, '--quiet');
    expect(r.status).toBe(2);
    expect(expectOneLine(r.stderr)).toContain(yaml);
    expectUntouched(ws, before);
  });

  it('changing only the status line (published → superseded) or the notes builds, and serves the same products', () => {
    const ws = workspace();
    spaces.push(ws);
    ws.replace(`releases/${PUBLISHED}/release.yaml`, /^status: published$/m, 'status: superseded');
    ws.write(`releases/${PUBLISHED}/notes.md`, ws.read(`releases/${PUBLISHED}/notes.md`) + '\nErratum: a typo fixed after publishing.\n');
    const r = kiln('build', '--content', ws.content, '--out', ws.out, '--quiet');
    expect(r.status, r.stderr).toBe(0);
    const a = readTree(base.out);
    const b = readTree(ws.out);
    for (const [p, bytes] of a) if (p.startsWith(`releases/${PUBLISHED}/files/`)) expect(b.get(p)!.equals(bytes), p).toBe(true);
    const site = servedSite(ws.out, PUBLISHED);
    expect(site.status).toBe('superseded');
    expect(site.notesMarkdown).toContain('Erratum: a typo fixed after publishing.');
    const index = JSON.parse(b.get('index.json')!.toString('utf8'));
    expect(index.releases.find((x: { id: string }) => x.id === PUBLISHED).status).toBe('superseded');
  });

  it('comment-only edits of the inputs of a published release do not fail', () => {
    const ws = workspace();
    spaces.push(ws);
    ws.write(LINEFITS, ws.read(LINEFITS).replace(/^(# .*\n)/, '$1# A comment added after publishing.\n'));
    ws.write('instruments/quillon-tarncam/instrument.yaml', '# A comment added after publishing.\n' + ws.read('instruments/quillon-tarncam/instrument.yaml'));
    const r = kiln('build', '--content', ws.content, '--out', ws.out, '--quiet');
    expect(r.status, r.stderr).toBe(0);
  });

  it('notes.md of a published release may change, but its absence is still an input error', () => {
    const { ws, before } = withPreviousOut();
    rmSync(ws.path(`releases/${PUBLISHED}/notes.md`));
    const r = kiln('build', '--content', ws.content, '--out', ws.out, '--quiet');
    expect(r.status).toBe(2);
    expect(expectOneLine(r.stderr)).toContain(join(ws.content, `releases/${PUBLISHED}/notes.md`));
    expectUntouched(ws, before);
  });
});
