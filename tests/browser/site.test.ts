/**
 * The built site in Debian's chromium (playwright-core, never a downloaded browser), served from
 * dist/ by a tiny local server. dist/ must come from `npm run build` (KILN_OUT, default .kiln/out).
 * Checksums are verified with node:crypto's SHA-256 (FIPS 180-4) against the release manifests.
 */
import { describe, expect, it } from 'vitest';
import { createHash } from 'node:crypto';
import { mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { gunzipSync } from 'node:zlib';
import type { ReleaseIndex, ReleaseManifest } from '../../generators/site-data/types.ts';
import { contentPages, isInline } from './support/release-pages.ts';
import { DIST, requireDist } from './support/server.ts';
import { launch, siteSession, watch } from './support/browser.ts';
import { finderDocuments } from '../../generators/site-data/finder.ts';

const SHOTS = '/tmp/shots';
/**
 * A drawn curve should have more than a handful of vertices; fewer means the data did not arrive.
 * The renderer thins curves in screen space (to a third of a pixel, src/lib/plot/simplify.ts), so
 * a smooth model curve across the frame legitimately keeps only some 15–20 vertices.
 */
const MIN_LINE_POINTS = 12;

requireDist();
const index = JSON.parse(readFileSync(join(DIST, 'data', 'index.json'), 'utf8')) as ReleaseIndex;
const releaseIds = index.releases.map((r) => r.id);
/** The newest release drawn on its own page, and the newest whose detectors have pages of their own. */
const inlineId = releaseIds.find(isInline)!;
const pagedId = releaseIds.find((id) => !isInline(id));
const PAGES = ['/', '/compare/', '/finder/', '/inspect/', '/about/', ...releaseIds.map((id) => `/releases/${id}/`)];

mkdirSync(SHOTS, { recursive: true });
const site = siteSession();
const open = (path: string) => site.open(path);

/** Vertices of a path: move/line commands and the H/V legs of step curves. */
const pointCount = (d: string) => (d.match(/[MLHV]/g) ?? []).length;

describe('every page', () => {
  for (const path of PAGES)
    it(`${path} loads without console errors, failed or off-site requests`, async () => {
      const { page, problems } = await open(path);
      expect(await page.title()).not.toBe('');
      await page.screenshot({ path: `${SHOTS}/page${path.replace(/\W+/g, '_')}.png`, fullPage: true });
      expect(problems).toEqual([]);
      await page.close();
    });
});

describe('release page', () => {
  const id = inlineId;
  it('the demo has a release drawn inline and one with a page per detector', () => {
    expect(inlineId).toBeDefined();
    expect(pagedId).toBeDefined();
  });
  const drawn = [`/releases/${id}/`, ...(pagedId ? contentPages(pagedId) : [])];
  for (const path of drawn)
  it(`draws every line plot with many points and the matrix image: ${path}`, async () => {
    const { page, problems } = await open(path);
    // Curves on energy grids (area, efficiency, FWHM and centroid models) carry many points; a
    // profile far below the peak may legitimately have few channels above zero.
    const figs = await page.$$eval('figure.kplot', (fs) => fs.map((f) => ({ id: f.id, ds: [...f.querySelectorAll('path.series:not(.points)')].map((p) => p.getAttribute('d') ?? '') })));
    const curves = figs.filter((f) => /^(ea|qe|fwhm|cen)-/.test(f.id) && !/-res-/.test(f.id));
    expect(curves.length).toBeGreaterThanOrEqual(4);
    for (const f of curves) expect(Math.max(...f.ds.map(pointCount)), f.id).toBeGreaterThanOrEqual(MIN_LINE_POINTS);
    for (const f of figs.filter((x) => x.id.startsWith('prof-'))) expect(f.ds.some((d) => pointCount(d) > 1), f.id).toBe(true);
    const pts = await page.$$eval('figure.kplot path.series.points', (ps) => ps.map((p) => p.getAttribute('d') ?? ''));
    expect(pts.length).toBeGreaterThan(0);
    for (const d of pts) expect(d.length).toBeGreaterThan(0);
    const imgs = await page.$$eval('figure.matrix-fig image', (is) => is.map((i) => i.getAttribute('href')));
    expect(imgs.length).toBeGreaterThan(0);
    for (const src of imgs) {
      const r = await page.request.get(site.url + src);
      expect(r.status()).toBe(200);
      expect([...(await r.body()).subarray(0, 4)]).toEqual([137, 80, 78, 71]);
    }
    expect(problems).toEqual([]);
    await page.close();
  });

  // Raw HTML in the notes: tests/browser/hostile-notes.test.ts builds a hostile fixture (the demo notes hold none).

  it('hover shows a readout, drag zooms, double-click resets, log toggle redraws', async () => {
    const { page } = await open(`/releases/${id}/`);
    const fig = page.locator('figure.kplot').first();
    await fig.scrollIntoViewIfNeeded();
    const box = (await fig.locator('svg.plot-svg').boundingBox())!;
    const before = await fig.locator('path.series').first().getAttribute('d');
    await page.mouse.move(box.x + box.width * 0.5, box.y + box.height * 0.4);
    await expect.poll(() => fig.locator('output.kplot-readout').textContent()).toMatch(/Energy [\d.]+ keV/);
    await page.mouse.move(box.x + box.width * 0.35, box.y + box.height * 0.2);
    await page.mouse.down();
    await page.mouse.move(box.x + box.width * 0.7, box.y + box.height * 0.6, { steps: 5 });
    await page.mouse.up();
    const zoomed = await fig.locator('path.series').first().getAttribute('d');
    expect(zoomed).not.toBe(before);
    await fig.locator('svg.plot-svg').dblclick({ position: { x: box.width * 0.5, y: box.height * 0.5 } });
    expect(await fig.locator('path.series').first().getAttribute('d')).toBe(before);
    const xlog = fig.getByRole('button', { name: 'log x' });
    await xlog.focus();
    await page.keyboard.press('Enter');
    expect(await xlog.getAttribute('aria-pressed')).toBe('false');
    expect(await fig.locator('path.series').first().getAttribute('d')).not.toBe(before);
    await page.close();
  });

  it('profile energy checkboxes change the drawn profiles', async () => {
    const { page } = await open(`/releases/${id}/`);
    const box = page.locator('.profiles').first();
    const count = () => box.locator('path.series').count();
    const n0 = await count();
    const boxes = box.locator('input[type=checkbox]');
    const total = await boxes.count();
    // The full set of profiles loads on demand from the detector's profiles.json: poll for the redraw.
    for (let i = 0; i < total; i++) await boxes.nth(i).check();
    await expect.poll(count).toBe(total);
    expect(total).toBeGreaterThan(n0);
    await boxes.nth(0).uncheck();
    await expect.poll(count).toBe(total - 1);
    await page.close();
  });
});

describe('downloads', () => {
  for (const id of releaseIds)
    it(`release ${id}: every download resolves and matches the manifest SHA-256`, async () => {
      const manifest = JSON.parse(readFileSync(join(DIST, 'data', 'releases', id, 'manifest.json'), 'utf8')) as ReleaseManifest;
      const { page } = await open(`/releases/${id}/`);
      // A release with a page per detector lists its downloads there.
      const pages = contentPages(id);
      const links: { href: string; sha: string }[] = [];
      for (const p of pages) {
        await page.goto(site.url + p);
        links.push(...(await page.$$eval('a.dl', (as) => as.map((a) => ({ href: a.getAttribute('href')!, sha: a.getAttribute('data-sha256')! })))));
      }
      expect(links.length).toBe(manifest.files.length);
      for (const f of manifest.files) {
        const link = links.find((l) => l.href === `/releases/${id}/${f.path}`);
        expect(link, f.path).toBeDefined();
        const r = await page.request.get(site.url + link!.href);
        expect(r.status()).toBe(200);
        const body = await r.body();
        expect(body.length).toBe(f.bytes);
        expect(createHash('sha256').update(body).digest('hex')).toBe(f.sha256);
      }
      const sums = await (await page.request.get(`${site.url}/releases/${id}/files/SHA256SUMS.txt`)).text();
      for (const f of manifest.files) expect(sums).toContain(`${f.sha256}  ${f.path.replace(/^files\//, '')}`);
      await page.close();
    });
});

describe('compare page', () => {
  it('changing the selection changes the plots and the URL', async () => {
    const { page, problems } = await open('/compare/');
    const first = () => page.locator('#compare-body path.series').first().getAttribute('d');
    // A pair whose effective areas differ (1.1.0 → 2.0.0 changes the contamination law); the
    // default pair may have identical areas (2.1.0 restates 2.0.0's per readout node), whose
    // ratio is the same flat line either way round.
    await page.selectOption('#sel-a', '1.1.0');
    await page.selectOption('#sel-b', '2.0.0');
    await expect.poll(() => page.textContent('#compare-status')).toContain('B = 2.0.0 against A = 1.1.0');
    const d0 = await first();
    const a0 = await page.inputValue('#sel-a');
    const b0 = await page.inputValue('#sel-b');
    // A different pair: swap A and B (a different picture whenever the releases differ).
    await page.selectOption('#sel-a', b0);
    await page.selectOption('#sel-b', a0);
    await expect.poll(() => page.textContent('#compare-status')).toContain(`B = ${a0} against A = ${b0}`);
    expect(await first()).not.toBe(d0);
    const u = new URL(page.url());
    expect(u.searchParams.get('a')).toBe(b0);
    expect(u.searchParams.get('b')).toBe(a0);
    await page.screenshot({ path: `${SHOTS}/compare-swapped.png`, fullPage: true });
    // The shared URL reproduces the choice.
    const again = await site.context.newPage();
    await again.goto(page.url(), { waitUntil: 'networkidle' });
    await expect.poll(() => again.textContent('#compare-status')).toContain(`B = ${a0} against A = ${b0}`);
    expect(await again.locator('#compare-body path.series').first().getAttribute('d')).toBe(await first());
    expect(problems).toEqual([]);
    await again.close();
    await page.close();
  });
});

describe('finder page', () => {
  it('lists the files valid for a date, published first, warning on superseded', async () => {
    const det = index.instruments[0].detectors[0].id;
    const p = index.releases.flatMap((r) => r.products.map((x) => ({ r, x }))).find((h) => h.x.detector === det)!;
    const date = p.x.validFrom;
    const { page } = await open(`/finder/?detector=${det}&date=${date}`);
    const rows = page.locator('#finder-hits tbody tr');
    expect(await rows.count()).toBeGreaterThan(0);
    const statuses = await page.$$eval('#finder-hits tbody tr td[data-label="Status"]', (t) => t.map((x) => x.textContent?.trim()));
    const rank = ['published', 'candidate', 'superseded', 'withdrawn'];
    const ranks = statuses.map((s) => rank.indexOf(s!));
    expect([...ranks].sort((a, b) => a - b)).toEqual(ranks);
    const warned = await page.$$eval('#finder-hits tbody tr', (trs) => trs.map((t) => [t.querySelector('td[data-label="Status"]')?.textContent?.trim(), /warning/.test(t.querySelector('td.note')?.textContent ?? '')]));
    for (const [s, w] of warned) expect(w).toBe(s === 'superseded' || s === 'withdrawn');
    await page.screenshot({ path: `${SHOTS}/finder-result.png`, fullPage: true });
    await page.close();
  });

  it('a readout node picks that node\'s matrix of a release built per node, and every whole-detector file', async () => {
    const perNode = index.releases.find((r) => r.products.some((x) => x.node !== undefined));
    expect(perNode, 'the demo has a release built per readout node').toBeDefined();
    const rmf = perNode!.products.find((x) => x.kind === 'rmf' && x.node !== undefined)!;
    const other = perNode!.products.find((x) => x.kind === 'rmf' && x.detector === rmf.detector && x.node !== rmf.node)!;
    const { page } = await open(`/finder/?detector=${rmf.detector}&date=${rmf.validFrom}&node=${rmf.node}`);
    await page.waitForSelector('#finder-hits');
    expect(await page.inputValue('#finder-node')).toBe(rmf.node);
    const files = await page.$$eval('#finder-hits td.file a', (as) => as.map((a) => a.getAttribute('href') ?? ''));
    expect(files).toContain(`/releases/${perNode!.id}/${rmf.path}`);
    expect(files).not.toContain(`/releases/${perNode!.id}/${other.path}`);
    // Files of releases built per detector still apply wherever the source fell.
    expect(files.some((f) => !f.startsWith(`/releases/${perNode!.id}/`))).toBe(true);
    await page.selectOption('#finder-node', '');
    await expect.poll(async () => (await page.$$eval('#finder-hits td.file a', (as) => as.map((a) => a.getAttribute('href') ?? ''))).includes(`/releases/${perNode!.id}/${other.path}`)).toBe(true);
    expect(new URL(page.url()).searchParams.get('node')).toBeNull();
    await page.close();
  });
});

describe('finder page with its file lists cut small or broken', () => {
  // The demo's files fit in one chunk per detector; here the page is served the demo index's
  // finder documents cut at 3 files per chunk (generators/site-data/finder.ts), or a chunk is
  // missing or wrong, by intercepting /data/finder/ requests.
  const det = index.instruments[0].detectors[0].id;
  const date = index.releases.flatMap((r) => r.products).find((x) => x.detector === det)!.validFrom;
  const path = `/finder/?detector=${det}&date=${date}`;
  const hrefs = (page: import('playwright-core').Page) => page.$$eval('#finder-hits td.file a', (as) => as.map((a) => a.getAttribute('href') ?? ''));
  const served = async (docs: Map<string, unknown>, status = (_p: string) => 200) => {
    const page = await site.context.newPage();
    const { problems } = watch(page, site.url);
    await page.route('**/data/finder/**', (route) => {
      const p = decodeURIComponent(new URL(route.request().url()).pathname.replace(/^\/data\//, ''));
      const code = status(p);
      return code === 200 && docs.has(p) ? route.fulfill({ status: 200, contentType: 'application/json', body: JSON.stringify(docs.get(p)) }) : route.fulfill({ status: code === 200 ? 404 : code, body: 'gone' });
    });
    await page.goto(site.url + path, { waitUntil: 'networkidle' });
    return { page, problems };
  };

  it('loads the first chunks, then older releases on "Load more", ending with the same list as with one chunk', async () => {
    const { page: whole } = await open(path);
    const all = await hrefs(whole);
    await whole.close();
    expect(all.length).toBeGreaterThan(3);
    const { page } = await served(new Map(finderDocuments(index, 3).map((d) => [d.path, d.doc])));
    await page.waitForSelector('#finder-hits');
    const first = await hrefs(page);
    expect(first.length).toBeLessThan(all.length);
    expect(all.slice(0, first.length)).toEqual(first);
    for (let n = 0; n < 50 && (await page.$('#finder-more')); n++) {
      if (n === 0) await page.screenshot({ path: `${SHOTS}/finder-load-more.png`, fullPage: true });
      await page.click('#finder-more');
      await page.waitForFunction(() => !document.querySelector('#finder-more[disabled]'));
    }
    expect(await page.$('#finder-more')).toBeNull();
    expect(await hrefs(page)).toEqual(all);
    await page.close();
  });

  it('a missing or wrong chunk is said on the page, with no file list', async () => {
    const docs = new Map(finderDocuments(index).map((d) => [d.path, d.doc]));
    const chunk = [...docs.keys()].find((p) => p.endsWith(`/${det}/0.json`))!;
    const missing = await served(docs, (p) => (p === chunk ? 404 : 200));
    await missing.page.waitForSelector('#finder-error');
    expect(await missing.page.textContent('#finder-error')).toMatch(new RegExp(`Could not load the file lists of ${det} for ${date}: .*${chunk.replace(/[.]/g, '\\.')}: HTTP 404\\. No result is shown`));
    expect(await missing.page.$('#finder-hits')).toBeNull();
    await missing.page.close();
    const wrong = await served(new Map([...docs, [chunk, docs.get(chunk.replace(/\/0\.json$/, '.json'))]]));
    await wrong.page.waitForSelector('#finder-error');
    expect(await wrong.page.textContent('#finder-error')).toMatch(/not a finder chunk \(schema kiln\/finder-manifest\/1, expected kiln\/finder-chunk\/1\)/);
    expect(await wrong.page.$('#finder-hits')).toBeNull();
    expect(wrong.problems).toEqual([]);
    await wrong.page.close();
  });
});

describe('inspect page', () => {
  const firstFile = (suffix: string) => {
    for (const id of releaseIds) {
      const dir = join(DIST, 'releases', id, 'files');
      const f = readdirSync(dir).find((n) => n.endsWith(suffix));
      if (f) return join(dir, f);
    }
    throw new Error(`no *${suffix} in dist/releases/*/files`);
  };

  for (const suffix of ['.rmf.gz', '.arf.gz'])
    it(`parses, checks and plots a valid ${suffix} file`, async () => {
      const { page, problems } = await open('/inspect/');
      await page.selectOption('#inspect-against', { index: 1 });
      await page.setInputFiles('#inspect-file', firstFile(suffix));
      await page.waitForSelector('#inspect-fitsjs', { timeout: 90_000 });
      expect(await page.locator('#inspect-error').count()).toBe(0);
      expect(await page.locator('#inspect-checks tbody tr, #inspect-passed tbody tr').count()).toBeGreaterThan(3);
      const paths = await page.$$eval('#inspect-result path.series', (ps) => ps.map((p) => p.getAttribute('d') ?? ''));
      expect(paths.some((d) => pointCount(d) >= MIN_LINE_POINTS)).toBe(true);
      expect(await page.textContent('#inspect-fitsjs')).toMatch(/fitsjs sees \d+ HDUs/);
      await page.screenshot({ path: `${SHOTS}/inspect${suffix.replace(/\W/g, '_')}.png`, fullPage: true });
      expect(problems).toEqual([]);
      await page.close();
    });

  it('reports a file that is not FITS', async () => {
    const { page } = await open('/inspect/');
    await page.setInputFiles('#inspect-file', { name: 'broken.rmf', mimeType: 'application/octet-stream', buffer: Buffer.from('this is not a FITS file '.repeat(200)) });
    await page.waitForSelector('#inspect-error');
    expect(await page.textContent('#inspect-error')).toMatch(/broken\.rmf/);
    await page.close();
  });

  it('reports a truncated FITS file', async () => {
    const whole = gunzipSync(readFileSync(firstFile('.rmf.gz')));
    const cut = join('/tmp', 'kiln-truncated.rmf');
    writeFileSync(cut, whole.subarray(0, Math.floor(whole.length / 2880 / 2) * 2880 + 100));
    const { page } = await open('/inspect/');
    await page.setInputFiles('#inspect-file', cut);
    await page.waitForSelector('#inspect-error, #inspect-fitsjs');
    const failed = (await page.locator('#inspect-error').count()) + (await page.locator('#inspect-checks .st-fail').count());
    expect(failed).toBeGreaterThan(0);
    await page.close();
  });
});

describe('without JavaScript', () => {
  it('release and compare pages still show plotted data', async () => {
    const nojs = await launch({ javaScriptEnabled: false });
    try {
      for (const path of [`/releases/${inlineId}/`, '/compare/']) {
        const page = await nojs.context.newPage();
        await page.goto(site.url + path, { waitUntil: 'networkidle' });
        const ds = await page.$$eval('path.series:not(.points)', (ps) => ps.map((p) => p.getAttribute('d') ?? ''));
        expect(ds.length).toBeGreaterThan(0);
        // The release page plots curves; the compare page's default pair may be a flat ratio line.
        if (path !== '/compare/') expect(ds.filter((d) => pointCount(d) >= MIN_LINE_POINTS).length).toBeGreaterThan(0);
        await page.screenshot({ path: `${SHOTS}/nojs${path.replace(/\W+/g, '_')}.png`, fullPage: true });
        await page.close();
      }
    } finally {
      await nojs.close();
    }
  });
});

describe('archived releases re-examined with current checks', () => {
  const archived = index.releases.filter((r) => r.reexamined);
  it('the demo has archived releases to re-examine', () => {
    expect(archived.map((r) => r.id).sort()).toEqual(['1.0.0', '1.1.0']);
  });
  for (const r of archived)
    it(`release ${r.id}: its page lists every finding of reexamined.json, the index links to them`, async () => {
      const doc = JSON.parse(readFileSync(join(DIST, 'data', 'releases', r.id, 'reexamined.json'), 'utf8')) as { findings: { id: string; status: string }[] };
      const { page, problems } = await open(`/releases/${r.id}/`);
      expect(await page.textContent('#reexamined')).toBe('Re-examined with current checks');
      const rows = await page.$$eval('#reexamined-table tbody tr', (trs) => trs.map((tr) => [tr.querySelector('td')?.textContent?.trim(), tr.querySelector('code')?.textContent]));
      expect(rows).toEqual(doc.findings.map((f) => [f.status, f.id]));
      await page.close();
      const home = await open('/');
      const link = await home.page.$eval(`.releases a[href="/releases/${r.id}/#reexamined"]`, (a) => a.textContent ?? '');
      expect(link).toContain(`${r.reexamined!.warn} warn since publication`);
      await home.page.close();
      expect([...problems, ...home.problems]).toEqual([]);
    });
});
