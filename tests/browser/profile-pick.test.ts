/**
 * Release page, "add any energy" to the line-profile plot: the row must come from the published
 * RMF itself. The expected row is read here in Node, independently of the page's code path
 * (node:zlib gunzip, generators/fits + generators/ogip readRmf, the OGIP grouped row expanded by
 * the rule of the OGIP memo CAL/GEN/92-002: N_GRP groups of N_CHAN channels from F_CHAN, TLMIN of
 * F_CHAN being the first channel), and the bin is the one with ENERG_LO ≤ E < ENERG_HI (same memo).
 */
import { describe, expect, it } from 'vitest';
import { mkdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { gunzipSync } from 'node:zlib';
import type { DetectorModelDoc, DetectorProfilesDoc, ReleaseIndex, ReleaseSummaryDoc } from '../../generators/site-data/types.ts';
import type { RmfData } from '../../generators/response/types.ts';
import { readFits } from '../../generators/fits/index.ts';
import { readRmf } from '../../generators/ogip/index.ts';
import { DIST, requireDist } from './support/server.ts';
import { siteSession } from './support/browser.ts';
import { newestInline } from './support/release-pages.ts';

const SHOTS = '/tmp/shots';
/** An energy between published profile energies (none of the demo releases lists it). */
const PICK_KEV = 3.21;
/** Far above any X-ray CCD grid (common practice, no source: such grids end near 10–20 keV). */
const OUTSIDE_KEV = 1000;
/** How long the RMF response is held back so the loading status can be seen. */
const HOLD_MS = 400;

requireDist();
const index = JSON.parse(readFileSync(join(DIST, 'data', 'index.json'), 'utf8')) as ReleaseIndex;
// The newest release whose page draws its detectors (the picker sits in a detector's section).
const id = newestInline(index);
const summary = JSON.parse(readFileSync(join(DIST, 'data', 'releases', id, 'summary.json'), 'utf8')) as ReleaseSummaryDoc;
const det = JSON.parse(readFileSync(join(DIST, 'data', 'releases', id, 'detectors', summary.detectors[0].id, 'model.json'), 'utf8')) as DetectorModelDoc;
const product = det.products.find((p) => p.kind === 'rmf')!;
const profiles = (JSON.parse(readFileSync(join(DIST, 'data', 'releases', id, 'detectors', det.id, 'profiles.json'), 'utf8')) as DetectorProfilesDoc).profiles;
const rmfPath = `/releases/${id}/${product.path}`;
const rmfName = product.path.split('/').pop()!;

/** The file's row in Node: channel energies and probabilities, every channel. */
function nodeRow(d: RmfData, energyKeV: number): { bin: number; lo: number; hi: number; x: number[]; p: number[] } {
  let bin = -1;
  for (let i = 0; i < d.energLoKeV.length; i++) if (d.energLoKeV[i] <= energyKeV && energyKeV < d.energHiKeV[i]) bin = i;
  if (bin < 0) throw new Error(`${energyKeV} keV not in the grid of ${rmfName}`);
  const p = new Array<number>(d.detchans).fill(0);
  const r = d.rows[bin];
  let k = 0;
  for (let g = 0; g < r.fChan.length; g++) for (let c = 0; c < r.nChan[g]; c++) p[r.fChan[g] - d.firstChannel + c] = r.matrix[k++];
  const x = Array.from(d.ebounds.eMinKeV, (e, i) => (e + d.ebounds.eMaxKeV[i]) / 2);
  return { bin, lo: d.energLoKeV[bin], hi: d.energHiKeV[bin], x, p };
}

const rmf = readRmf(readFits(gunzipSync(readFileSync(join(DIST, rmfPath))), { fileName: rmfName })).data;
const expected = nodeRow(rmf, PICK_KEV);

mkdirSync(SHOTS, { recursive: true });
const session = siteSession();
const open = () => session.open(`/releases/${id}/`);

const rmfRequests = () => session.server.requests.filter((r) => r === rmfPath).length;

describe('release page: profile at any energy, from the published RMF', () => {
  it('the chosen energy is not one of the published profile energies', () => {
    expect(profiles.energiesKeV).not.toContain(PICK_KEV);
    expect(product, 'an RMF product for the first detector').toBeDefined();
  });

  it('adds a curve whose values are the RMF row of the bin containing the energy', async () => {
    const { page, problems } = await open();
    const box = page.locator('.profiles').first();
    const status = box.locator('output.profile-status');
    const curves = () => box.locator('path.series').count();
    // Hold the RMF back a moment, so the loading line is visible (the request still goes to the site).
    await page.route(`**${rmfPath}`, async (route) => {
      await new Promise((ok) => setTimeout(ok, HOLD_MS));
      await route.continue();
    });
    const before = rmfRequests();
    const n0 = await curves();
    // Keyboard only: focus the number input, type, Enter submits.
    const input = box.getByRole('spinbutton', { name: /any energy/ });
    await input.focus();
    await page.keyboard.type(String(PICK_KEV));
    await page.keyboard.press('Enter');
    await expect.poll(() => status.textContent()).toMatch(/Reading the published RMF, [\d.]+ KiB…/);
    await expect.poll(() => status.textContent(), { timeout: 90_000 }).toMatch(/^Drawn: row/);
    expect(await curves()).toBe(n0 + 1);
    expect(rmfRequests() - before).toBe(1);

    // Legend names the energy and the bin (edges as in the file's ENERG_LO/ENERG_HI).
    const legend = (await box.locator('ul.legend li').allTextContents()).find((t) => t.startsWith(`E = ${PICK_KEV} keV`));
    expect(legend).toBeDefined();
    const m = legend!.match(/\(bin ([\d.]+)–([\d.]+) keV\)/)!;
    expect(m).not.toBeNull();
    const width = expected.hi - expected.lo;
    expect(Math.abs(Number(m[1]) - expected.lo)).toBeLessThan(width / 2);
    expect(Math.abs(Number(m[2]) - expected.hi)).toBeLessThan(width / 2);
    expect(await status.textContent()).toContain(`row ${expected.bin + 1} of ${rmfName}`);

    // The new curve is drawn (a step path with many vertices) and dashed apart from the published ones.
    const picked = box.locator('path.series').last();
    expect(((await picked.getAttribute('d')) ?? '').match(/[MLHV]/g)?.length ?? 0).toBeGreaterThan(10);

    // The values: the page's row (offered as CSV, the same array the curve is drawn from) equals the file's row.
    const href = await status.locator('a.row-csv').getAttribute('href');
    expect(href).toMatch(/^blob:/);
    const csv = await page.evaluate(async (u) => (await fetch(u)).text(), href!);
    const rows = csv.split('\n').filter((l) => /^[\d.eE+-]+,/.test(l)).map((l) => l.split(',').map(Number));
    expect(rows.length).toBe(rmf.detchans);
    rows.forEach(([x, p], c) => {
      expect(x).toBe(expected.x[c]);
      expect(p).toBe(expected.p[c]);
    });
    expect(expected.p.some((v) => v > 0)).toBe(true);

    // A new checkbox for the pick hides and shows the curve; a second energy reuses the file read.
    const tick = box.locator('label.picked input[type=checkbox]');
    await tick.uncheck();
    await expect.poll(curves).toBe(n0);
    await tick.check();
    await expect.poll(curves).toBe(n0 + 1);
    await input.fill('6.1');
    await input.press('Enter');
    await expect.poll(() => status.textContent()).toContain(`Drawn: row ${nodeRow(rmf, 6.1).bin + 1} of`);
    expect(await curves()).toBe(n0 + 2);
    expect(rmfRequests() - before).toBe(1);

    await box.scrollIntoViewIfNeeded();
    await box.screenshot({ path: `${SHOTS}/profile-pick.png` });
    expect(problems).toEqual([]);
    await page.close();
  });

  it('an energy outside the grid gets a message naming the grid range', async () => {
    const { page, problems } = await open();
    const box = page.locator('.profiles').first();
    const status = box.locator('output.profile-status');
    const n0 = await box.locator('path.series').count();
    await box.getByRole('spinbutton', { name: /any energy/ }).fill(String(OUTSIDE_KEV));
    await box.getByRole('button', { name: 'add' }).click();
    await expect.poll(() => status.textContent(), { timeout: 90_000 }).toMatch(/outside the matrix energy grid/);
    const m = (await status.textContent())!.match(/choose ([\d.]+)–([\d.]+) keV/)!;
    const lo = rmf.energLoKeV[0];
    const hi = rmf.energHiKeV[rmf.energHiKeV.length - 1];
    // Shown to four significant digits.
    expect(Math.abs(Number(m[1]) - lo) / lo).toBeLessThan(5e-4);
    expect(Math.abs(Number(m[2]) - hi) / hi).toBeLessThan(5e-4);
    expect(await box.locator('path.series').count()).toBe(n0);
    await box.locator('fieldset').screenshot({ path: `${SHOTS}/profile-pick-outside.png` });
    expect(problems).toEqual([]);
    await page.close();
  });

  it('a failed fetch of the RMF gets a message', async () => {
    const page = await session.context.newPage();
    await page.route(`**${rmfPath}`, (route) => route.fulfill({ status: 503, body: 'unavailable' }));
    await page.goto(`${session.url}/releases/${id}/`, { waitUntil: 'networkidle' });
    const box = page.locator('.profiles').first();
    const status = box.locator('output.profile-status');
    await box.getByRole('spinbutton', { name: /any energy/ }).fill(String(PICK_KEV));
    await box.getByRole('button', { name: 'add' }).click();
    await expect.poll(() => status.textContent(), { timeout: 90_000 }).toMatch(/Could not read the published RMF: could not fetch .*HTTP 503/);
    expect(await status.getAttribute('class')).toContain('error');
    await page.close();
  });
});
