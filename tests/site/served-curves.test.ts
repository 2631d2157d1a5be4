/**
 * The curves the served site shows against the product files it serves. dist/, as `npm run build`
 * leaves it, is read the way a browser reads it: each detector's documents through the pages' own
 * loader (src/lib/site-fetch.ts fetchDetector, its fetch answered from dist/), the plot specs
 * through the pages' own functions (src/lib/release-plots.ts), and the products from
 * dist/releases/<key>/files/ (each checked against the served manifest's SHA-256) through Kiln's
 * FITS and OGIP readers, which Debian's python3-astropy cross-checks on one ARF and one RMF. Then:
 * - every page's static SVG of the effective area, FWHM and centroid is the one those specs draw,
 *   so the curves compared below are the curves on the page;
 * - effective area: each epoch's curve = the served ARF's SPECRESP at its bin centres, within the
 *   site's 4-digit rounding and the file's float32;
 * - FWHM and centroid, whole detector and each node: the Gaussian core refitted to the served
 *   matrix's rows (checks/gaussian-core.ts) = the plotted curve, within the measured bias of that
 *   refit; and no other curve of the release fits that matrix, so a swapped curve cannot pass.
 * tests/site/products.test.ts compares a fresh private build with astropy and scipy reading every
 * file; this file checks what is served, from the build already made, in about a second.
 */
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { gunzipSync } from 'node:zlib';
import { beforeAll, describe, expect, it, vi } from 'vitest';
import { readFits } from '../../generators/fits/index.ts';
import { readArf, readRmf } from '../../generators/ogip/index.ts';
import { fitRowCore } from '../../generators/checks/gaussian-core.ts';
import { detectorDir, siteDataBase } from '../../generators/site-data/paths.ts';
import type { ArfData, RmfData } from '../../generators/response/types.ts';
import type { DetectorSite, ManifestFile, ReleaseIndex, ReleaseManifest, ReleaseSummaryDoc } from '../../generators/site-data/types.ts';
import { centroidPlot, effectiveAreaPlot, fwhmPlot, regionCurveLabel } from '../../src/lib/release-plots.ts';
import { figureHtml } from '../../src/lib/plot/index.ts';
import { fetchDetector } from '../../src/lib/site-fetch.ts';
import { DIST_MARKER, requireFreshBuild } from '../support/fresh-build.ts';
import { REPO } from '../pipeline/helpers.ts';
import { runAstropyChecks, runPythonJson } from '../support/python.ts';

const DIST = join(REPO, 'dist');
/** The site rounds plotted curves to 4 significant digits (pipeline/site-detector.ts CURVE_DIGITS). */
const CURVE_DIGITS = 4;
/** Energies: 6 significant digits in the site documents (site-detector.ts), 5 in the plot spec (src/lib/plot/build.ts). */
const ENERGY_DIGITS = [6, 5];
/** SPECRESP and the bin edges are 32-bit floats in the file (TFORM E, FITS Standard 4.0 §7.3.3): relative 2^-24. */
const FLOAT32_REL = 2 ** -24;
/** FWHM² = 8 ln 2 · σ² for a Gaussian (definition of the FWHM). */
const FWHM2_PER_SIGMA2 = 8 * Math.LN2;
const EV_PER_KEV = 1000;
/** Every 10th point of a plotted resolution curve (120 points, pipeline/site-detector.ts CURVE_POINTS: 12 energies per curve). */
const SAMPLE_EVERY = 10;
/**
 * Bias of the core refit (fitRowCore, the peak and the channels above it down to 20 % of the peak)
 * against the model core the curves plot, measured on the served demo (every release, detector and
 * node; channels 15 eV wide): below 0.4 keV on detectors whose tail is the collection model
 * (partial-charge events inside the core) ≤ 6.8 eV FWHM and ≤ 11.1 eV centroid; elsewhere below
 * 1 keV ≤ 1.6 / 2.1 eV; 1–3 keV ≤ 0.52 / 0.68 eV; above ≤ 0.41 / 0.18 eV (the fit of a log-parabola
 * to 15 eV channels). Tolerances: the measured margin plus ~30 %.
 */
const TIERS = [
  { belowKeV: 0.4, collectionOnly: true, fwhmEv: 8.8, centroidEv: 14.3 },
  { belowKeV: 1, collectionOnly: false, fwhmEv: 2.1, centroidEv: 2.7 },
  { belowKeV: 3, collectionOnly: false, fwhmEv: 0.67, centroidEv: 0.89 },
  { belowKeV: Infinity, collectionOnly: false, fwhmEv: 0.53, centroidEv: 0.23 },
];

/** Largest difference rounding to `digits` significant digits can make. */
const roundingSlack = (v: number, digits: number) => (v === 0 ? 0 : 0.5 * 10 ** (Math.floor(Math.log10(Math.abs(v))) - digits + 1));
const readJson = <T,>(...parts: string[]): T => JSON.parse(readFileSync(join(DIST, ...parts), 'utf8')) as T;

interface Served {
  key: string;
  manifest: ReleaseManifest;
  detectors: { d: DetectorSite; tailSource: string }[];
}
let served: Served[] = [];
const products = new Map<string, Uint8Array>();

/** A served product file (path as in the manifest), its bytes checked against the manifest's SHA-256. */
function productBytes(key: string, f: ManifestFile): Uint8Array {
  const id = `${key}/${f.path}`;
  let bytes = products.get(id);
  if (!bytes) {
    const gz = readFileSync(join(DIST, 'releases', key, f.path));
    expect(createHash('sha256').update(gz).digest('hex'), `${id}: served bytes vs manifest SHA-256`).toBe(f.sha256);
    bytes = gunzipSync(gz);
    products.set(id, bytes);
  }
  return bytes;
}
const arfOf = (key: string, f: ManifestFile): ArfData => readArf(readFits(productBytes(key, f), { fileName: f.path })).data;
const rmfOf = (key: string, f: ManifestFile): RmfData => readRmf(readFits(productBytes(key, f), { fileName: f.path })).data;

/** The plot label of an RMF's curve: "model" for the whole detector, the region's label for a node's matrix. */
const curveLabel = (f: ManifestFile) => (f.node === undefined ? 'model' : regionCurveLabel({ node: f.node, rowBand: f.rowBand ?? null } as Parameters<typeof regionCurveLabel>[0]));

describe('the served site\'s curves against the served products', () => {
  beforeAll(async () => {
    requireFreshBuild(DIST_MARKER, 'the site build (dist/)');
    // The pages' loader fetches same-origin paths; here they are answered from dist/.
    vi.stubGlobal('fetch', async (url: string) => new Response(readFileSync(join(DIST, decodeURIComponent(url)))));
    const index = readJson<ReleaseIndex>('data', 'index.json');
    for (const r of index.releases) {
      const summary = readJson<ReleaseSummaryDoc>('data', 'releases', r.key, 'summary.json');
      const manifest = readJson<ReleaseManifest>('data', 'releases', r.key, 'manifest.json');
      const detectors = [];
      for (const det of summary.detectors) {
        const d = (await fetchDetector(r.key, det.id, { checks: false, profiles: false })).site;
        detectors.push({ d, tailSource: d.resolution.tailSource ?? 'law' });
      }
      served.push({ key: r.key, manifest, detectors });
    }
    vi.unstubAllGlobals();
  });

  it('covers every release of the demo; each page\'s area, FWHM and centroid SVG is drawn from the documents it serves', () => {
    expect(served.map((s) => s.key).sort()).toEqual(['1.0.0', '1.1.0', '2.0.0', '2.1.0']);
    let figures = 0;
    for (const s of served) {
      const releasePage = readFileSync(join(DIST, 'releases', s.key, 'index.html'), 'utf8');
      for (const { d } of s.detectors) {
        const page = readFileSync(join(DIST, 'releases', s.key, 'detectors', d.id, 'index.html'), 'utf8');
        // As components/DetectorSection.astro renders them: the spec's figure with its data address.
        const specSrc = `${siteDataBase(s.key)}${detectorDir(d.id)}/`;
        const inline = releasePage.includes(`<section class="detector" data-det="${d.id}">`);
        for (const spec of [effectiveAreaPlot(d, s.key), fwhmPlot(d), centroidPlot(d)]) {
          const html = figureHtml(spec, { specSrc });
          expect(page.includes(html), `${s.key} ${d.id}: detector page shows ${spec.id} as drawn from the served documents`).toBe(true);
          if (inline) expect(releasePage.includes(html), `${s.key} ${d.id}: release page shows ${spec.id}`).toBe(true);
          figures++;
        }
      }
    }
    expect(figures).toBe(served.reduce((n, s) => n + 3 * s.detectors.length, 0));
  });

  it('each epoch\'s plotted effective area equals the served ARF\'s SPECRESP bin by bin (Kiln\'s FITS reader), within the 4-digit rounding', () => {
    let bins = 0;
    for (const s of served)
      for (const { d } of s.detectors) {
        const plot = effectiveAreaPlot(d, s.key);
        for (const ep of d.epochs) {
          const f = s.manifest.files.find((x) => x.kind === 'arf' && x.detector === d.id && x.epoch === ep.id);
          expect(f, `${s.key} ${d.id} ${ep.id}: an ARF is served`).toBeTruthy();
          const arf = arfOf(s.key, f!);
          const series = plot.series.find((x) => x.label === `effective area, epoch ${ep.id}`);
          expect(series?.x.length, `${s.key} ${d.id} ${ep.id}: one plotted point per ARF bin`).toBe(arf.specrespCm2.length);
          // One assertion per epoch, naming the first bin off (thousands of expect calls would dominate the run).
          const off: string[] = [];
          for (let i = 0; i < arf.specrespCm2.length; i++) {
            const centre = 0.5 * (arf.energLoKeV[i] + arf.energHiKeV[i]);
            const a = arf.specrespCm2[i];
            const xSlack = ENERGY_DIGITS.reduce((t, n) => t + roundingSlack(centre, n), 2 * FLOAT32_REL * centre);
            if (Math.abs(series!.x[i] - centre) > xSlack) off.push(`bin ${i}: plotted at ${series!.x[i]} keV, bin centre ${centre} keV`);
            if (Math.abs(series!.y[i]! - a) > roundingSlack(a, CURVE_DIGITS) * (1 + 1e-9) + FLOAT32_REL * a) off.push(`bin ${i} (${centre.toFixed(4)} keV): plotted ${series!.y[i]} vs SPECRESP ${a} cm²`);
            bins++;
          }
          expect(off.slice(0, 3), `${s.key} ${d.id} ${ep.id}: ${off.length} point(s) off the served ARF`).toEqual([]);
        }
      }
    expect(bins).toBeGreaterThan(5000);
  });

  it('the plotted FWHM and centroid curves (whole detector and each node) equal the core refitted to the served matrix rows, and no other curve of the release does', () => {
    let compared = 0;
    let nodeCurves = 0;
    for (const s of served) {
      // Every resolution curve of the release, each of which a wrong page could show instead.
      const curves = s.detectors.flatMap(({ d }) => {
        const fw = fwhmPlot(d).series.filter((x) => x.kind === 'line');
        const ce = centroidPlot(d).series.filter((x) => x.kind === 'line');
        return fw.map((c, k) => ({ name: `${d.id} "${c.label}"`, detector: d.id, label: c.label, x: c.x, fwhm: c.y, centroid: ce[k].y, ceLabel: ce[k].label }));
      });
      for (const c of curves) expect(c.ceLabel, `${s.key} ${c.name}: FWHM and centroid curves in the same order`).toBe(c.label);
      for (const { d, tailSource } of s.detectors)
        for (const f of s.manifest.files.filter((x) => x.kind === 'rmf' && x.detector === d.id)) {
          const rmf = rmfOf(s.key, f);
          const label = curveLabel(f);
          const own = curves.find((c) => c.detector === d.id && c.label === label);
          expect(own, `${s.key} ${f.path}: its curve "${label}" is plotted`).toBeTruthy();
          if (label !== 'model') nodeCurves++;
          // The refit at each sampled energy: the row whose bin holds it.
          const samples = own!.x.flatMap((e, i) => {
            if (i % SAMPLE_EVERY !== SAMPLE_EVERY / 2) return [];
            let row = 0;
            while (row < rmf.energHiKeV.length - 1 && rmf.energHiKeV[row] <= e) row++;
            const core = fitRowCore(rmf, row, { side: 'upper' });
            expect(core, `${s.key} ${f.path} ${e} keV: core refitted`).toBeTruthy();
            const tier = TIERS.find((t) => e < t.belowKeV && (!t.collectionOnly || tailSource === 'collection'))!;
            const lo = rmf.energLoKeV[row];
            const hi = rmf.energHiKeV[row];
            return [{ i, e, tier, binEv: (hi - lo) * EV_PER_KEV, fwhmEv: core!.fwhmEv, shiftEv: (core!.centroidKeV - 0.5 * (lo + hi)) * EV_PER_KEV }];
          });
          /** Points of a curve off this matrix: FWHM with the bin's own width²/12 (a row is for a spectrum flat across its bin), centroid − the row's photon energy (its bin centre). */
          const misses = (c: (typeof curves)[number]) =>
            samples.filter((p) => {
              const model = Math.sqrt(c.fwhm[p.i]! ** 2 + (FWHM2_PER_SIGMA2 * p.binEv ** 2) / 12);
              return Math.abs(p.fwhmEv - model) > p.tier.fwhmEv || Math.abs(p.shiftEv - c.centroid[p.i]!) > p.tier.centroidEv;
            });
          for (const p of misses(own!)) {
            const model = Math.sqrt(own!.fwhm[p.i]! ** 2 + (FWHM2_PER_SIGMA2 * p.binEv ** 2) / 12);
            expect.fail(`${s.key} ${f.path} at ${p.e} keV: refitted FWHM ${p.fwhmEv.toFixed(2)} eV vs plotted ${model.toFixed(2)} eV (±${p.tier.fwhmEv}), centroid offset ${p.shiftEv.toFixed(2)} vs plotted ${own!.centroid[p.i]} eV (±${p.tier.centroidEv})`);
          }
          compared += samples.length;
          // Every other curve of the release (one log grid over the channels' range, 120 points each) misses somewhere.
          const others = curves.filter((c) => c !== own);
          expect(others.every((c) => c.x.length === own!.x.length), `${s.key}: every curve on the same grid`).toBe(true);
          for (const other of others) expect(misses(other).length, `${s.key} ${f.path}: ${other.name} must not fit this matrix`).toBeGreaterThan(0);
        }
    }
    expect(compared).toBeGreaterThan(150);
    expect(nodeCurves, 'node matrices of release 2.1.0').toBe(8);
  });

  it.runIf(runAstropyChecks)('Kiln\'s reader returns what astropy reads from one served ARF and one served RMF, value for value', () => {
    const s = served.find((x) => x.key === '2.1.0')!;
    const arfFile = s.manifest.files.find((x) => x.kind === 'arf' && x.detector === 'bi1' && x.epoch === 'e2')!;
    const rmfFile = s.manifest.files.find((x) => x.kind === 'rmf' && x.detector === 'fi0' && x.node === 'b')!;
    const arf = arfOf(s.key, arfFile);
    const rmf = rmfOf(s.key, rmfFile);
    const ref = runPythonJson<{ arf: Record<string, number[]>; rmf: { tlmin: number; emin: number[]; emax: number[]; lo: number[]; hi: number[]; rows: { i: number; f: number[]; n: number[]; m: number[] }[] } }>(
      'astropy',
      String.raw`
import json, sys, numpy as np
from astropy.io import fits
d = json.load(sys.stdin)
with fits.open(d['arf']) as f:
    t = f['SPECRESP'].data
    arf = {k: np.asarray(t[k], float).tolist() for k in ['ENERG_LO', 'ENERG_HI', 'SPECRESP']}
with fits.open(d['rmf']) as f:
    m = f['MATRIX']; e = f['EBOUNDS'].data
    col = m.columns.names.index('F_CHAN') + 1
    rows = [{'i': i, 'f': np.atleast_1d(m.data['F_CHAN'][i]).astype(int).tolist(), 'n': np.atleast_1d(m.data['N_CHAN'][i]).astype(int).tolist(), 'm': np.atleast_1d(m.data['MATRIX'][i]).astype(float).tolist()} for i in range(0, len(m.data), d['every'])]
    rmf = {'tlmin': int(m.header['TLMIN%d' % col]), 'emin': np.asarray(e['E_MIN'], float).tolist(), 'emax': np.asarray(e['E_MAX'], float).tolist(),
           'lo': np.asarray(m.data['ENERG_LO'], float).tolist(), 'hi': np.asarray(m.data['ENERG_HI'], float).tolist(), 'rows': rows}
print(json.dumps({'arf': arf, 'rmf': rmf}))
`,
      { arf: join(DIST, 'releases', s.key, arfFile.path), rmf: join(DIST, 'releases', s.key, rmfFile.path), every: 7 },
    );
    // float32 values widen to the same float64 in both readers: equal exactly.
    expect(Array.from(arf.energLoKeV)).toEqual(ref.arf.ENERG_LO);
    expect(Array.from(arf.energHiKeV)).toEqual(ref.arf.ENERG_HI);
    expect(Array.from(arf.specrespCm2)).toEqual(ref.arf.SPECRESP);
    expect(rmf.firstChannel).toBe(ref.rmf.tlmin);
    expect(Array.from(rmf.ebounds.eMinKeV)).toEqual(ref.rmf.emin);
    expect(Array.from(rmf.ebounds.eMaxKeV)).toEqual(ref.rmf.emax);
    expect(Array.from(rmf.energLoKeV)).toEqual(ref.rmf.lo);
    expect(Array.from(rmf.energHiKeV)).toEqual(ref.rmf.hi);
    expect(ref.rmf.rows.length).toBeGreaterThan(100);
    for (const r of ref.rmf.rows) {
      const row = rmf.rows[r.i];
      // astropy keeps a row's empty groups (N_CHAN 0) where Kiln's grouping writes none.
      const groups = r.n.map((n, g) => [r.f[g], n]).filter(([, n]) => n > 0);
      expect(Array.from(row.fChan).map((fc, g) => [fc, row.nChan[g]]), `row ${r.i} groups`).toEqual(groups);
      expect(Array.from(row.matrix), `row ${r.i} elements`).toEqual(r.m);
    }
  });
});
