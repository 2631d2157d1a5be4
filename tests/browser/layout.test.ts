/**
 * Layout in Debian's chromium (playwright-core, never a downloaded browser): the download tables fit
 * an 800 px window without sideways scrolling while the full SHA-256 stays on the page, and in print
 * media no interactive control is rendered. Expected hashes come from the release manifests.
 * "Controls do not print" and "tables fit the screen" are common practice, no source.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { ReleaseIndex, ReleaseManifest } from '../../generators/site-data/types.ts';
import { DIST, requireDist } from './support/server.ts';
import { contentPages, newestInline } from './support/release-pages.ts';
import { siteSession } from './support/browser.ts';

/** The narrow desktop width the tables must fit. */
const NARROW_PX = 800;
/** Sub-pixel rounding of scrollWidth against clientWidth. */
const ROUNDING_PX = 1;
const CONTROLS = 'button, select, input, textarea, .epoch-pick, .profile-pick, .vfilter, form';

requireDist();
const index = JSON.parse(readFileSync(join(DIST, 'data', 'index.json'), 'utf8')) as ReleaseIndex;
const det = index.instruments[0].detectors[0].id;
const firstProduct = index.releases.flatMap((r) => r.products).find((p) => p.detector === det)!;
const finderPath = `/finder/?detector=${det}&date=${firstProduct.validFrom}`;

const site = siteSession();


async function open(path: string, width: number) {
  const page = await site.context.newPage();
  await page.setViewportSize({ width, height: 900 });
  await page.goto(site.url + path, { waitUntil: 'networkidle' });
  return page;
}
const overflow = (page: Awaited<ReturnType<typeof open>>, sel: string) =>
  page.$eval(sel, (t) => {
    const w = t.closest('.table-wrap') ?? t;
    return w.scrollWidth - w.clientWidth;
  });

describe(`download tables at ${NARROW_PX} px`, () => {
  for (const r of index.releases)
    it(`release ${r.id}: no sideways scrolling, every full SHA-256 in the table and its copy button`, async () => {
      const manifest = JSON.parse(readFileSync(join(DIST, 'data', 'releases', r.id, 'manifest.json'), 'utf8')) as ReleaseManifest;
      // A release with a page per detector has a download table on each (its detector's files).
      const cells: (string | null)[] = [];
      const copies: (string | null)[] = [];
      for (const path of contentPages(r.id)) {
        const page = await open(path, NARROW_PX);
        expect(await overflow(page, '#download-table'), path).toBeLessThanOrEqual(ROUNDING_PX);
        cells.push(...(await page.$$eval('#download-table code.hash', (cs) => cs.map((c) => c.textContent))));
        copies.push(...(await page.$$eval('#download-table button.copy', (bs) => (bs as HTMLElement[]).filter((b) => !b.hidden).map((b) => b.getAttribute('data-copy')))));
        await page.close();
      }
      const expected = manifest.files.map((f) => f.sha256);
      expect([...cells].sort()).toEqual([...expected].sort());
      expect([...copies].sort()).toEqual([...expected].sort());
    });

  it('finder: results and the full list fit, each hit with its full SHA-256', async () => {
    const page = await open(finderPath, NARROW_PX);
    await page.waitForSelector('#finder-hits');
    expect(await overflow(page, '#finder-hits')).toBeLessThanOrEqual(ROUNDING_PX);
    expect(await overflow(page, '#finder-all')).toBeLessThanOrEqual(ROUNDING_PX);
    const shas = await page.$$eval('#finder-hits code.hash', (cs) => cs.map((c) => c.textContent ?? ''));
    expect(shas.length).toBeGreaterThan(0);
    const known = new Set(index.releases.flatMap((r) => r.products.map((p) => p.sha256)));
    for (const s of shas) expect(known.has(s)).toBe(true);
    await page.close();
  });
});

describe('print', () => {
  for (const path of [`/releases/${newestInline(index)}/`, finderPath, '/compare/'])
    it(`${path}: no interactive control is rendered`, async () => {
      const page = await open(path, NARROW_PX);
      await page.emulateMedia({ media: 'print' });
      const shown = await page.$$eval(CONTROLS, (es) => es.filter((e) => e.getClientRects().length > 0).map((e) => e.outerHTML.slice(0, 60)));
      expect(shown).toEqual([]);
      // Rows and figures keep together across page breaks.
      expect(await page.$eval('table.data tr', (t) => getComputedStyle(t).breakInside)).toBe('avoid');
      if (await page.$('figure.kplot')) expect(await page.$eval('figure.kplot', (f) => getComputedStyle(f).breakInside)).toBe('avoid');
      await page.close();
    });
});
