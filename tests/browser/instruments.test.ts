/**
 * Two instruments in one content tree (tests/support/two-instruments.ts): the demo's TARNCAM and
 * an invented four-sensor camera with two filter positions, both with a release 1.0.0. One build
 * and one site of the fixture serve every test here: release keys, review scoping, FITS FILTER
 * per configuration (read back with astropy), compare and publish naming, plan job ids, bad
 * configuration references, and in Debian's chromium the finder scoped by instrument and filter,
 * the home page grouped by instrument and a keyed release's overlay plots.
 */
import { spawnSync } from 'node:child_process';
import { cpSync, existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parse, stringify } from 'yaml';
import type { Check, ReleaseIndex, ReleaseOverlayDoc } from '../../generators/site-data/types.ts';
import { DEMO_CONTENT, kiln, REPO } from '../pipeline/helpers.ts';
import { runPythonJson } from '../support/python.ts';
import { ALUMINIUM_UM, FILTERS, FIRST, SECOND, SENSORS, writeTwoInstruments } from '../support/two-instruments.ts';
import { siteSession } from './support/browser.ts';

const work = mkdtempSync(join(tmpdir(), 'kiln-instruments-'));
const content = join(work, 'content');
const out = join(work, 'out');
const dist = join(work, 'dist');
let index: ReleaseIndex;
const B1 = `${SECOND}~1.0.0`;
const B2 = `${SECOND}~1.1.0`;
const checksOf = (key: string): Check[] => (JSON.parse(readFileSync(join(out, 'releases', key, 'validation.json'), 'utf8')) as { checks: Check[] }).checks;

beforeAll(() => {
  writeTwoInstruments(DEMO_CONTENT, content);
  const b = kiln('build', '--content', content, '--out', out, '--quiet');
  if (b.status !== 0) throw new Error(`fixture build failed:\n${b.stderr}`);
  index = JSON.parse(readFileSync(join(out, 'index.json'), 'utf8')) as ReleaseIndex;
  // The fixture's coarse grid (quick builds) fails closure, so its releases are drafts, and the
  // finder never offers drafts. For the site only, the built index and finder documents (all the
  // finder reads) call them candidates; products, checks and every other document stay as built.
  const asCandidates = (file: string) => writeFileSync(file, readFileSync(file, 'utf8').replaceAll('"status":"draft"', '"status":"candidate"'));
  asCandidates(join(out, 'index.json'));
  // Every manifest and chunk under finder/ (the chunks sit in a directory per detector entry).
  for (const f of readdirSync(join(out, 'finder'), { recursive: true, withFileTypes: true })) if (f.isFile()) asCandidates(join(f.parentPath, f.name));
  const s = spawnSync(process.execPath, [join(REPO, 'scripts', 'build-site.mjs')], {
    cwd: REPO,
    encoding: 'utf8',
    env: { ...process.env, KILN_OUT: out, KILN_CONTENT: content, KILN_SITE_DIST: dist },
  });
  if (s.status !== 0) throw new Error(`fixture site build failed:\n${s.stderr}${s.stdout}`);
}, 300_000);
afterAll(() => rmSync(work, { recursive: true, force: true }));

describe('release ids scoped by instrument', () => {
  it('both instruments have a release 1.0.0, each in its own output folder, keyed in the index', () => {
    const ones = index.releases.filter((r) => r.id === '1.0.0');
    expect(ones.map((r) => [r.instrument, r.key]).sort()).toEqual([
      [SECOND, B1],
      [FIRST, '1.0.0'],
    ]);
    for (const r of index.releases) expect(existsSync(join(out, 'releases', r.key, 'manifest.json'))).toBe(true);
    // Every product of a release belongs to its own instrument (file names start with its id).
    for (const r of index.releases) for (const p of r.products) expect(p.path.startsWith(`files/${r.instrument}_`)).toBe(true);
    expect(index.releases.find((r) => r.key === B2)!.supersedesKey).toBe(B1);
  });

  it('the review pairs a release only with the previous one of its instrument and configuration', () => {
    // 1.0.0 of TARNCAM comes after BRIARCAM's 1.0.0 in build order, but has nothing of its own to be reviewed against.
    expect(checksOf('1.0.0').filter((c) => c.id.startsWith('review.'))).toEqual([]);
    const review = checksOf(B2).filter((c) => c.id.startsWith('review.'));
    expect(review.length).toBeGreaterThan(0);
    const b2Products = new Set(index.releases.find((r) => r.key === B2)!.products.map((p) => p.id));
    for (const c of review) expect(b2Products.has(c.product!)).toBe(true);
    // Same filters in both releases: every area ratio is 1 within its tolerance. Pairing a thin
    // product with a thick one would change the soft area by several times the 2 % tolerance
    // (the astropy test below shows how much the two configurations differ).
    const ratios = review.filter((c) => c.id === 'review.arf.area-ratio');
    expect(ratios).toHaveLength(SENSORS.length * 2);
    for (const c of ratios) expect(c.status, `${c.product}: ${c.message}`).toBe('pass');
    // The read-noise change of s0 (1.1.0) is flagged in both configurations, and only for s0.
    const fwhm = review.filter((c) => c.id === 'review.rmf.fwhm' && c.status === 'review').map((c) => c.product).sort();
    expect(fwhm).toEqual(['s0.thick-rmf', 's0.thin-rmf']);
  });
});

describe('configurations', () => {
  it('every product states the FITS FILTER of its configuration and DETNAM of its sensor (read with astropy)', () => {
    const r = index.releases.find((x) => x.key === B1)!;
    expect(r.products).toHaveLength(SENSORS.length * 2 * 2);
    const files = r.products.map((p) => ({ path: join(out, 'releases', B1, p.path), filter: p.filter!, sensor: p.detector.split('.')[0], kind: p.kind }));
    const got = runPythonJson<[string, string][]>(
      'astropy',
      `import json, sys
from astropy.io import fits
out = []
for f in json.load(sys.stdin):
    with fits.open(f['path']) as h:
        e = h[1].header
        out.append([e['FILTER'], e['DETNAM']])
print(json.dumps(out))`,
      files,
    );
    files.forEach((f, i) => expect(got[i]).toEqual([FILTERS[f.filter as keyof typeof FILTERS], f.sensor.toUpperCase()]));
  });

  it('the thick filter transmits less at 0.5 keV than the thin one (more aluminium; astropy reads both ARFs)', () => {
    // Beer–Lambert: a thicker layer of the same absorber transmits less (trade fact).
    expect(ALUMINIUM_UM.thick).toBeGreaterThan(ALUMINIUM_UM.thin);
    const arf = (c: string) => join(out, 'releases', B1, 'files', `${SECOND}_s0.${c}_launch_1.0.0.arf.gz`);
    const [thin, thick] = runPythonJson<number[]>(
      'astropy',
      `import json, sys
import numpy as np
from astropy.io import fits
vals = []
for f in json.load(sys.stdin):
    with fits.open(f) as h:
        d = h['SPECRESP'].data
        mid = 0.5 * (d['ENERG_LO'] + d['ENERG_HI'])
        vals.append(float(np.interp(0.5, mid, d['SPECRESP'])))
print(json.dumps(vals))`,
      [arf('thin'), arf('thick')],
    );
    expect(thick).toBeGreaterThan(0);
    expect(thick / thin).toBeLessThan(0.98);
  });

  it('an unknown configuration in release.yaml is refused naming file, field, value and the expected ids', () => {
    const bad = join(work, 'bad-content');
    cpSync(content, bad, { recursive: true });
    const file = join(bad, 'releases', B2, 'release.yaml');
    const doc = parse(readFileSync(file, 'utf8'));
    writeFileSync(file, stringify({ ...doc, configurations: ['thin', 'medium'] }));
    const r = kiln('plan', '--content', bad);
    expect(r.status).toBe(2);
    expect(r.stderr).toMatch(/release\.yaml:\d+: configurations\[1\]: unknown configuration \(got "medium"; expected one of thin, thick/);
    expect(r.stderr).not.toMatch(/\n\s+at /);
    rmSync(bad, { recursive: true, force: true });
  });
});

describe('naming releases on the command line', () => {
  it('a bare id two instruments use is refused listing both qualified names (exit 2)', () => {
    const r = kiln('compare', '1.0.0', B2, '--out', out);
    expect(r.status).toBe(2);
    expect(r.stderr).toContain(`${SECOND}~1.0.0, ${FIRST}~1.0.0`);
    const p = kiln('publish', '1.0.0', '--content', content);
    expect(p.status).toBe(2);
    expect(p.stderr).toContain('release id 1.0.0 is used by 2 instruments');
  });

  it('compare refuses a pair of two instruments and compares a qualified pair within one', () => {
    const x = kiln('compare', `${FIRST}~1.0.0`, B1, '--out', out);
    expect(x.status).toBe(2);
    expect(x.stderr).toContain(`releases of two instruments cannot be compared (${FIRST} and ${SECOND})`);
    const ok = kiln('compare', B1, B2, '--out', out, '--json');
    expect(ok.status).toBe(1); // the s0 read-noise change needs review
    const rep = JSON.parse(ok.stdout) as { pairs: { a: string; b: string }[] };
    expect(rep.pairs.length).toBe(SENSORS.length * 2 * 2);
    // Each pair within one configuration: the product ids after "key:" name the same entry.
    for (const p of rep.pairs) expect(p.a.split(':')[1]).toBe(p.b.split(':')[1]);
  });

  it('publish resolves a qualified name to its release (a draft is refused by its key)', () => {
    const p = kiln('publish', B1, '--content', content);
    expect(p.status).toBe(2);
    expect(p.stderr).toContain(`release ${B1} is a draft; only a candidate is published`);
    expect(existsSync(join(content, 'archive', B1))).toBe(false);
  });

  it('plan job ids name instrument, release and detector entry; releases by key', () => {
    const r = kiln('plan', '--content', content);
    expect(r.status).toBe(0);
    const plan = JSON.parse(r.stdout) as { jobs: { id: string; release: string; detector: string }[] };
    const ids = plan.jobs.map((j) => j.id);
    expect(new Set(ids).size).toBe(ids.length);
    expect(ids).toContain(`${FIRST}~1.0.0/fi0`);
    expect(ids).toContain(`${SECOND}~1.0.0/s3.thick`);
    expect(plan.jobs.find((j) => j.id === `${SECOND}~1.1.0/s0.thin`)!.release).toBe(B2);
    expect(plan.jobs.find((j) => j.id === `${FIRST}~1.0.0/bi1`)!.release).toBe('1.0.0');
  });
});

const site = siteSession(() => dist);

describe('site of two instruments (chromium)', () => {
  it('the home page lists each instrument with its own releases', async () => {
    const { page, problems } = await site.open('/');
    const tables = await page.$$eval('table.releases', (ts) => ts.map((t) => [t.getAttribute('data-instrument'), [...t.querySelectorAll('tbody a strong')].map((s) => s.textContent)]));
    expect(tables.sort()).toEqual([
      [SECOND, ['1.1.0', '1.0.0']],
      [FIRST, ['1.0.0']],
    ]);
    expect(await page.$$eval(`a[href="/releases/${B1}/"]`, (as) => as.length)).toBeGreaterThan(0);
    expect(problems).toEqual([]);
    await page.close();
  });

  it('the finder offers only the chosen instrument and filter, and never a file of the other filter', async () => {
    const { page, problems } = await site.open(`/finder/?instrument=${SECOND}&detector=s2&filter=thick&date=2026-07-01`);
    await page.waitForSelector('#finder-hits');
    const files = await page.$$eval('#finder-hits td.file a', (as) => as.map((a) => a.getAttribute('href') ?? ''));
    expect(files.length).toBe(4); // RMF + ARF of 1.1.0 and of 1.0.0
    for (const f of files) expect(f).toMatch(new RegExp(`^/releases/${SECOND}~1\\.[01]\\.0/files/${SECOND}_s2\\.thick_`));
    const cells = await page.$$eval('#finder-hits tbody tr', (trs) => trs.map((t) => [t.querySelector('[data-label="Instrument"]')?.textContent, t.querySelector('[data-label="Filter"]')?.textContent]));
    for (const [i, f] of cells) {
      expect(i).toBe('BRIARCAM');
      expect(f).toContain(FILTERS.thick);
    }
    // The detector list holds only the chosen instrument's sensors.
    const offered = await page.$$eval('#finder-detector option:not([disabled])', (os) => os.map((o) => o.getAttribute('value')));
    expect(offered).toEqual([...SENSORS]);
    // Switching the filter switches every file.
    await page.selectOption('#finder-filter', 'thin');
    await expect.poll(async () => (await page.$$eval('#finder-hits td.file a', (as) => as.map((a) => a.getAttribute('href') ?? ''))).every((h) => h.includes('_s2.thin_'))).toBe(true);
    // The first instrument: no filter choice, its own detectors, its own 1.0.0.
    await page.selectOption('#finder-instrument', FIRST);
    expect(await page.isHidden('#finder-filter')).toBe(true);
    await expect.poll(async () => (await page.$$eval('#finder-hits td.file a', (as) => as.map((a) => a.getAttribute('href') ?? ''))).every((h) => h.startsWith(`/releases/1.0.0/files/${FIRST}_`))).toBe(true);
    expect(problems).toEqual([]);
    await page.close();
  });

  it('the release pages of both 1.0.0 exist and name their instrument', async () => {
    for (const [key, ins] of [[B1, SECOND], ['1.0.0', FIRST]]) {
      const { page, problems } = await site.open(`/releases/${key}/`);
      expect(await page.textContent('h1')).toContain('1.0.0');
      expect(await page.textContent('dl.facts')).toContain(ins);
      expect(problems).toEqual([]);
      await page.close();
    }
  });

  it('the overlay of a keyed release comes from its own folder, one curve per sensor and filter, titled by its key', async () => {
    // What the fixture builds for BRIARCAM 1.0.0: each sensor in each configuration is an entry D.C.
    const entries = SENSORS.flatMap((s) => Object.keys(FILTERS).map((c) => `${s}.${c}`)).sort();
    const doc = JSON.parse(readFileSync(join(out, 'releases', B1, 'overlay.json'), 'utf8')) as ReleaseOverlayDoc;
    expect(doc.detectors.map((d) => d.id).sort()).toEqual(entries);
    expect(doc.detectors.every((d) => !d.regions?.length)).toBe(true); // whole-detector products only
    const src = `/data/releases/${B1}/overlay.json`;
    const { page, problems } = await site.open(`/releases/${B1}/`);
    const fig = page.locator('figure#ov-fwhm');
    expect(await fig.getAttribute('data-spec-src')).toBe(src);
    expect(await fig.locator('svg.plot-svg path.series:not(.points)').count()).toBe(entries.length);
    // Both instruments have a 1.0.0: the title names this one by its key, as its detector plots do.
    const named = new RegExp(`\\(release ${B1.replace(/[.~]/g, '\\$&')}\\)$`);
    expect(await fig.locator('svg.plot-svg').getAttribute('aria-label')).toMatch(named);
    // Interaction rebuilds the plot from that document (fetched once, under the key) with the same curves and title.
    const before = site.server.requests.filter((r) => r === src).length;
    await fig.locator('button', { hasText: 'log y' }).click();
    await expect.poll(() => page.locator('figure#ov-fwhm button[aria-pressed="true"]', { hasText: 'log y' }).count()).toBe(1);
    expect(site.server.requests.filter((r) => r === src).length - before).toBe(1);
    expect(await fig.locator('svg.plot-svg path.series:not(.points)').count()).toBe(entries.length);
    expect(await fig.locator('svg.plot-svg').getAttribute('aria-label')).toMatch(named);
    expect(problems).toEqual([]);
    await page.close();
  });
});
