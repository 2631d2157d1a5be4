/**
 * Release page overlay and the detector pages' profile plots in Debian's chromium: each overlay
 * plot draws one curve per detector (and per readout node where the release builds per-node
 * matrices), with a legend entry per curve and labelled axes; the interactive redraw loads the
 * release's overlay.json once and keeps every curve. The tail, shelf and line-efficiency plots of
 * a detector draw the model, the line fits with 1σ bars and the refitted rows. Expected counts
 * come from the build's own documents (summary.json, overlay.json, model.json) read here in Node.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { DetectorModelDoc, ReleaseIndex, ReleaseOverlayDoc } from '../../generators/site-data/types.ts';
import { DIST, requireDist } from './support/server.ts';
import { siteSession } from './support/browser.ts';
import { contentPages } from './support/release-pages.ts';

requireDist();
const index = JSON.parse(readFileSync(join(DIST, 'data', 'index.json'), 'utf8')) as ReleaseIndex;
// Releases by key: where the site and the build keep them (the demo's keys are its ids).
const overlayOf = (key: string) => JSON.parse(readFileSync(join(DIST, 'data', 'releases', key, 'overlay.json'), 'utf8')) as ReleaseOverlayDoc;
// The newest release with per-node curves: every overlay plot, node curves included.
const id = index.releases.map((r) => r.key).find((r) => overlayOf(r).detectors.some((d) => (d.regions ?? []).length > 0))!;
const doc = overlayOf(id);
const curves = (withRegions: boolean) => doc.detectors.length + (withRegions ? doc.detectors.reduce((n, d) => n + (d.regions?.length ?? 0), 0) : 0);
/** Plot id → curves expected and axis titles (what src/lib/release-plots.ts states for each). */
const EXPECTED: Record<string, { n: number; x: string; y: string }> = {
  'ov-fwhm': { n: curves(true), x: 'Energy (keV)', y: 'FWHM (eV)' },
  'ov-cen': { n: curves(true), x: 'Energy (keV)', y: 'Centroid − line energy (eV)' },
  // Nodes of the demo differ in noise and gain only: tail and shelf are the detector's.
  'ov-tail': { n: curves(false), x: 'Energy (keV)', y: 'Tail fraction of events' },
  'ov-shelf': { n: curves(false), x: 'Energy (keV)', y: 'Shelf fraction of events' },
  'ov-leff': { n: curves(true), x: 'Energy (keV)', y: 'Detected fraction' },
  'ov-ea': { n: curves(false), x: 'Energy (keV)', y: 'Effective area (cm²)' },
};
// A detector page of a release publishing whole-detector matrices (refit markers) with line fits.
const detRelease = index.releases.map((r) => r.key).find((r) => r !== id && overlayOf(r).detectors.some((d) => d.efficiency))!;
const detPage = contentPages(detRelease)[0];
const detId = overlayOf(detRelease).detectors[0].id;
const detModel = JSON.parse(readFileSync(join(DIST, 'data', 'releases', detRelease, 'detectors', detId, 'model.json'), 'utf8')) as DetectorModelDoc;

const session = siteSession();

async function figureFacts(page: import('playwright-core').Page, figId: string) {
  const fig = page.locator(`figure#${figId}`);
  return {
    curves: await fig.locator('svg.plot-svg path.series:not(.points)').count(),
    points: await fig.locator('svg.plot-svg path.series.points').count(),
    bars: await fig.locator('svg.plot-svg path.errorbars').count(),
    legend: await fig.locator('ul.legend li').count(),
    titles: await fig.locator('svg.plot-svg text.title').allTextContents(),
    label: await fig.locator('svg.plot-svg').getAttribute('aria-label'),
    nonEmpty: await fig.locator('svg.plot-svg path.series').evaluateAll((ps) => ps.every((p) => ((p.getAttribute('d') ?? '').match(/[ML]/g)?.length ?? 0) >= 2)),
  };
}

describe(`release ${id}: overlay of every detector`, () => {
  it('each overlay plot has one curve per detector (and node), a legend entry each, labelled axes and an accessible name', async () => {
    const { page, problems } = await session.open(`/releases/${id}/`);
    expect(await page.locator('nav.toc a[href="#overlay"]').count()).toBe(1);
    expect(await page.locator('section.overlay h2#overlay').textContent()).toBe('All detectors compared');
    for (const [figId, want] of Object.entries(EXPECTED)) {
      const f = await figureFacts(page, figId);
      expect(f.curves, `${figId}: curves`).toBe(want.n);
      expect(f.legend, `${figId}: legend entries`).toBe(want.n);
      expect(f.titles, `${figId}: axis titles`).toEqual([want.x, want.y]);
      expect(f.label, `${figId}: accessible name`).toMatch(new RegExp(`^All detectors: .+ \\(release ${id.replace(/\./g, '\\.')}\\)$`));
      expect(f.nonEmpty, `${figId}: every curve drawn`).toBe(true);
    }
    // Legend names each detector; node curves name their node.
    const legend = await page.locator('figure#ov-fwhm ul.legend li').allTextContents();
    for (const d of doc.detectors) {
      expect(legend).toContain((d.regions ?? []).length ? `${d.name} (whole detector)` : d.name);
      for (const g of d.regions ?? []) expect(legend).toContain(`${d.name}, node ${g.node}`);
    }
    // Interaction loads overlay.json once and redraws the same curves on a log axis.
    const before = session.server.requests.filter((r) => r === `/data/releases/${id}/overlay.json`).length;
    await page.locator('figure#ov-fwhm button', { hasText: 'log y' }).click();
    await expect.poll(() => page.locator('figure#ov-fwhm button[aria-pressed="true"]', { hasText: 'log y' }).count()).toBe(1);
    await page.locator('figure#ov-leff button', { hasText: 'log y' }).click();
    await expect.poll(() => page.locator('figure#ov-leff button[aria-pressed="true"]', { hasText: 'log y' }).count()).toBe(1);
    expect((await figureFacts(page, 'ov-fwhm')).curves).toBe(EXPECTED['ov-fwhm'].n);
    expect(session.server.requests.filter((r) => r === `/data/releases/${id}/overlay.json`).length - before).toBe(1);
    await page.screenshot({ path: '/tmp/kiln-overlay.png', fullPage: false });
    expect(problems).toEqual([]);
  });
});

describe(`release ${detRelease}, ${detId}: tail, shelf and line efficiency`, () => {
  it('draws the model, the line fits with 1σ bars and the refitted rows, with labelled axes; the table shows the error columns', async () => {
    const { page, problems } = await session.open(detPage);
    const n = detModel.lineFits.length;
    for (const [figId, y] of [[`tail-${detId}`, 'Tail fraction of events'], [`shelf-${detId}`, 'Shelf fraction of events']] as const) {
      const f = await figureFacts(page, figId);
      expect(f.curves, `${figId}: model curve`).toBe(1 + (detModel.regions ?? []).filter((g) => (figId.startsWith('tail') ? g.tailFraction : g.shelfFraction)).length);
      expect(f.points, `${figId}: measured and refitted`).toBe(2);
      expect(f.titles).toEqual(['Energy (keV)', y]);
      expect(f.legend).toBe(f.curves + f.points);
      // Markers: one circle per line in each series (two arcs per circle in the path).
      const arcs = await page.locator(`figure#${figId} svg.plot-svg path.series.points`).evaluateAll((ps) => ps.map((p) => ((p.getAttribute('d') ?? '').match(/a/g) ?? []).length / 2));
      expect(Math.max(...arcs)).toBeLessThanOrEqual(n);
      expect(Math.max(...arcs)).toBeGreaterThan(0);
    }
    expect((await figureFacts(page, `tail-${detId}`)).bars, 'tail: 1σ bars').toBe(1);
    const eff = await figureFacts(page, `leff-${detId}`);
    expect(eff.curves).toBe(1 + (detModel.regions ?? []).filter((g) => g.efficiencyDetected).length);
    expect(eff.titles).toEqual(['Energy (keV)', 'Detected fraction']);
    // Line-fit table: tail, shelf and efficiency with their errors.
    const heads = await page.locator(`section.detector[data-det="${detId}"] details table thead th`).allTextContents();
    for (const h of ['Tail fraction', 'Shelf fraction', 'Efficiency', 'Model efficiency']) expect(heads).toContain(h);
    expect(heads.filter((h) => h.startsWith('±')).length, 'errors of centroid, FWHM, tail, shelf, efficiency').toBe(5);
    expect(problems).toEqual([]);
  });
});
