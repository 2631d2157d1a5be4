/**
 * `kiln build` of the demo content: the output layout, manifest sizes and SHA-256 against the
 * bytes, every product opened by an outside FITS reader (astropy) with its checksums verified,
 * and `kiln check` on every product; archived releases re-examined with current checks, their
 * archive untouched (SHA-256 of every archived file against the copy the build started from).
 */
import { existsSync, mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { gunzipSync } from 'node:zlib';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runAstropyChecks, runPythonJson } from '../support/python.ts';
import { DEMO_CONTENT, kiln, readTree, sha256, treeDigest, workspace, type CliResult, type Workspace } from './helpers.ts';

/** Releases of the demo content (content/releases/); see content/README.md. */
const DEMO_RELEASES = ['1.0.0', '1.1.0', '2.0.0', '2.1.0'];

interface ManifestFile {
  path: string;
  bytes: number;
  sha256: string;
  kind: string;
}

let ws: Workspace;
let run: CliResult;
const manifests = new Map<string, { release: string; files: ManifestFile[] }>();

beforeAll(() => {
  ws = workspace({ cache: 'cold' });
  run = kiln('build', '--content', ws.content, '--out', ws.out);
  if (run.status === 0)
    for (const id of DEMO_RELEASES) manifests.set(id, JSON.parse(readFileSync(join(ws.out, 'releases', id, 'manifest.json'), 'utf8')));
});
afterAll(() => ws?.dispose());

const products = (): { release: string; path: string; kind: string; file: string }[] =>
  [...manifests.entries()].flatMap(([release, m]) => m.files.map((f) => ({ release, path: f.path, kind: f.kind, file: join(ws.out, 'releases', release, f.path) })));

describe('kiln build of the demo content', () => {
  it('exits 0 and writes index.json and, per release, manifest/validation/site JSON and gzipped products', () => {
    expect(run.stderr).not.toMatch(/^\s+at /m);
    expect(run.status, run.stderr).toBe(0);
    const tree = readTree(ws.out);
    expect(tree.has('index.json')).toBe(true);
    const index = JSON.parse(tree.get('index.json')!.toString('utf8'));
    expect(index.releases.map((r: { id: string }) => r.id).sort()).toEqual(DEMO_RELEASES);
    for (const id of DEMO_RELEASES) {
      for (const f of ['manifest.json', 'validation.json', 'summary.json', 'spectral.json', 'spectral-elements.json']) expect(tree.has(`releases/${id}/${f}`), `${id}/${f}`).toBe(true);
      // Site data split per product: each detector's documents and one per epoch (generators/site-data/paths.ts).
      const summary = JSON.parse(tree.get(`releases/${id}/summary.json`)!.toString('utf8'));
      expect(summary.detectors.length).toBeGreaterThan(0);
      for (const d of summary.detectors) {
        for (const f of ['model', 'profiles', 'matrix', 'checks', 'area']) expect(tree.has(`releases/${id}/detectors/${d.id}/${f}.json`), `${id}/${d.id}/${f}`).toBe(true);
        for (const e of d.epochs) expect(tree.has(`releases/${id}/detectors/${d.id}/epochs/${e.id}.json`), `${id}/${d.id}/${e.id}`).toBe(true);
        expect(tree.has(`finder/${index.instruments[0].id}/${d.id}.json`)).toBe(true);
        expect(tree.has(`finder/${index.instruments[0].id}/${d.id}/0.json`)).toBe(true);
      }
      const files = readdirSync(join(ws.out, 'releases', id, 'files'));
      expect(files.length).toBeGreaterThan(0);
      for (const f of files) expect(f).toMatch(/\.(rmf|arf|rsp)\.gz$/);
      // The manifest lists exactly the files present, no more, no fewer.
      expect(manifests.get(id)!.files.map((m) => m.path).sort()).toEqual(files.map((f) => `files/${f}`).sort());
    }
    // Nothing outside the documented layout.
    for (const p of tree.keys())
      expect(p).toMatch(/^(index\.json|finder\/[^/]+\/[^/]+(\/\d+)?\.json|releases\/[^/]+\/(manifest\.json|validation\.json|summary\.json|overlay\.json|reexamined\.json|spectral\.json|spectral-elements\.json|model\.json|model\.schema\.json|files\/[^/]+\.gz|detectors\/[^/]+\/((model|profiles|matrix|checks|area|supplement)\.json|epochs\/[^/]+\.json)))$/);
  });

  it('every check of a validation report is identified by its id and product alone (sign-off and comparisons join on them)', () => {
    for (const id of DEMO_RELEASES) {
      const report = JSON.parse(readFileSync(join(ws.out, 'releases', id, 'validation.json'), 'utf8')) as { checks: { id: string; product: string | null }[] };
      const keys = report.checks.map((c) => `${c.id} ${c.product ?? ''}`);
      expect(keys.filter((k, i) => keys.indexOf(k) !== i), id).toEqual([]);
    }
  });

  it('every manifest entry has the size and SHA-256 of the bytes on disk (node:crypto)', () => {
    expect(manifests.size).toBe(DEMO_RELEASES.length);
    let n = 0;
    for (const [id, m] of manifests) {
      expect(m.release).toBe(id);
      for (const f of m.files) {
        const bytes = readFileSync(join(ws.out, 'releases', id, f.path));
        expect(bytes.length, f.path).toBe(f.bytes);
        expect(sha256(bytes), f.path).toBe(f.sha256);
        // gzip magic 1f 8b (RFC 1952 §2.3.1) and a stream that decompresses.
        expect([bytes[0], bytes[1]]).toEqual([0x1f, 0x8b]);
        expect(() => gunzipSync(bytes)).not.toThrow();
        n++;
      }
    }
    expect(n).toBe(38); // 4 (1.0.0) + 8 (1.1.0) + 10 (2.0.0): 2 RMFs + one ARF per detector and epoch; + 16 (2.1.0): 8 per-node RMFs + 8 ARFs
  });

  it.runIf(runAstropyChecks)('astropy opens every gunzipped product: verify("exception") passes, CHECKSUM/DATASUM verify, no warnings', () => {
    // Reference: astropy.io.fits (Debian python3-astropy), HDUList.verify and checksum=True, which
    // implement the FITS standard 4.0 and its checksum convention (FITS 4.0 Appendix J).
    const dir = join(ws.dir, 'gunzipped');
    mkdirSync(dir, { recursive: true });
    const list = products().map((p, i) => {
      const file = join(dir, `${i}-${p.path.split('/').pop()!.replace(/\.gz$/, '')}`);
      writeFileSync(file, gunzipSync(readFileSync(p.file)));
      return { file, kind: p.kind, name: `${p.release}/${p.path}` };
    });
    expect(list.length).toBe(38);
    const code = `
import json, sys, warnings
from astropy.io import fits
out = []
for p in json.load(sys.stdin):
    r = {"name": p["name"], "kind": p["kind"], "warnings": [], "error": None, "hdus": []}
    with warnings.catch_warnings(record=True) as w:
        warnings.simplefilter("always")
        try:
            with fits.open(p["file"], checksum=True) as hdul:
                hdul.verify("exception")
                for h in hdul:
                    r["hdus"].append({
                        "extname": h.header.get("EXTNAME"),
                        "hasChecksum": "CHECKSUM" in h.header and "DATASUM" in h.header,
                        "checksum": h.verify_checksum(),
                        "datasum": h.verify_datasum(),
                    })
        except Exception as e:
            r["error"] = repr(e)
        r["warnings"] = [str(x.message) for x in w]
    out.append(r)
print(json.dumps(out))
`;
    const res = runPythonJson<{ name: string; kind: string; warnings: string[]; error: string | null; hdus: { extname: string | null; hasChecksum: boolean; checksum: number; datasum: number }[] }[]>('astropy', code, list);
    expect(res.length).toBe(list.length);
    for (const r of res) {
      expect(r.error, r.name).toBeNull();
      expect(r.warnings, r.name).toEqual([]);
      for (const h of r.hdus) {
        expect(h.hasChecksum, `${r.name} ${h.extname}`).toBe(true);
        // verify_checksum/verify_datasum return 1 when the stored value matches (astropy docs).
        expect(h.checksum, `${r.name} ${h.extname}`).toBe(1);
        expect(h.datasum, `${r.name} ${h.extname}`).toBe(1);
      }
      // OGIP CAL/GEN/92-002: an RMF has MATRIX and EBOUNDS extensions, an ARF a SPECRESP extension.
      const ext = r.hdus.map((h) => h.extname);
      if (r.kind === 'rmf') expect(ext, r.name).toEqual(expect.arrayContaining(['MATRIX', 'EBOUNDS']));
      if (r.kind === 'arf') expect(ext, r.name).toContain('SPECRESP');
    }
  });

  it('`kiln check` passes on every product (exit 0)', () => {
    const files = products().map((p) => p.file);
    expect(files.length).toBe(38);
    const r = kiln('check', ...files, '--json');
    expect(r.stderr).toBe('');
    expect(r.status, r.stdout.slice(0, 2000)).toBe(0);
    // One report per file, each with checks and none failed.
    const report = JSON.parse(r.stdout) as { files: { fileName: string; kind: string; counts: { pass: number; fail: number } }[] };
    expect(report.files.map((f) => f.fileName).sort()).toEqual([...files].sort());
    for (const f of report.files) {
      expect(f.counts.fail, f.fileName).toBe(0);
      expect(f.counts.pass, f.fileName).toBeGreaterThan(0);
    }
  });
});

describe('archived releases re-examined with current checks', () => {
  const ARCHIVED = ['1.0.0', '1.1.0'];
  const doc = (id: string) => JSON.parse(readFileSync(join(ws.out, 'releases', id, 'reexamined.json'), 'utf8'));

  it('leaves every archived byte as it was (content/archive/ of the copy vs the demo content)', () => {
    expect(run.status, run.stderr).toBe(0);
    expect(treeDigest(ws.path('archive'))).toEqual(treeDigest(join(DEMO_CONTENT, 'archive')));
  });

  it('writes reexamined.json for archived releases only, its counts in the index', () => {
    const index = JSON.parse(readFileSync(join(ws.out, 'index.json'), 'utf8'));
    for (const r of index.releases) {
      const has = ARCHIVED.includes(r.id);
      expect(existsSync(join(ws.out, 'releases', r.id, 'reexamined.json')), r.id).toBe(has);
      if (!has) {
        expect(r.reexamined).toBeUndefined();
        continue;
      }
      const d = doc(r.id);
      expect(d.schema).toBe('kiln/reexamination/1');
      expect(r.reexamined).toEqual(d.counts);
      expect(d.counts.checks).toBeGreaterThan(100);
      expect(run.stderr).toContain(`release ${r.id} (${r.status}): re-examined with current checks: ${d.counts.fail} failed, ${d.counts.warn} warnings`);
    }
  });

  it('every finding is new or worse than in the published report (content/archive/<id>/validation.json)', () => {
    const rank = { pass: 0, review: 1, warn: 2, fail: 3 } as const;
    for (const id of ARCHIVED) {
      const published: { id: string; product: string | null; status: keyof typeof rank }[] = JSON.parse(readFileSync(join(DEMO_CONTENT, 'archive', id, 'validation.json'), 'utf8')).checks;
      for (const f of doc(id).findings) {
        const then = published.find((c) => c.id === f.id && c.product === f.product);
        expect(f.publishedStatus).toBe(then ? then.status : null);
        if (then) expect(rank[f.status as keyof typeof rank]).toBeGreaterThan(rank[then.status]);
      }
    }
  });

  it("finds 1.1.0's Tarn-B tail held below its lowest line, by the factor its inputs give", () => {
    // Lowest line of the published line fits and the bottom of the instrument's energy grid,
    // read from the content files themselves.
    const csv = readFileSync(join(DEMO_CONTENT, 'releases', '1.1.0', 'linefits', 'bi1.csv'), 'utf8').split('\n').filter((l) => /^[A-Z][a-z]? K/.test(l));
    const lowestKeV = Math.min(...csv.map((l) => Number(l.split(',')[1])));
    const gridMinKeV = Number(/energyGrid:[\s\S]*?minKeV:\s*([0-9.]+)/.exec(readFileSync(join(DEMO_CONTENT, 'instruments', 'quillon-tarncam', 'instrument.yaml'), 'utf8'))![1]);
    const f = doc('1.1.0').findings.find((x: { id: string; product: string }) => x.id === 'model.extrapolation.tail' && x.product === 'bi1-rmf');
    expect(f).toBeDefined();
    expect(f.status).toBe('warn'); // a published release warns; only a candidate fails
    expect(f.publishedStatus).toBeNull();
    expect(f.measured).toBeCloseTo(lowestKeV / gridMinKeV, 3);
    expect(f.message).toMatch(/held at the outermost line fit/);
  });
});
