/**
 * The custom response page in Debian's chromium: the RMF and ARF built in the page's Web Worker
 * from the published model document are byte for byte those of `kiln response` for the same
 * choices (run here in Node on the build output the site was made from), and for a choice equal
 * to a published product (its epoch's reference date, the model's grid) both equal the published
 * file's bytes (gunzipped with node:zlib). astropy opens every file the page makes
 * (verify('exception'), CHECKSUM/DATASUM). Bad choices get their message next to the control and
 * no files. The generator chunk is not fetched until the reader asks for a build.
 */
import { describe, expect, it } from 'vitest';
import { mkdirSync, mkdtempSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { gunzipSync } from 'node:zlib';
import type { Page } from 'playwright-core';
import { DIST, requireDist } from './support/server.ts';
import { siteSession } from './support/browser.ts';
import { kiln } from '../pipeline/helpers.ts';
import { requireFreshOutput } from '../support/fresh-build.ts';
import { runAstropyChecks, runPythonJson } from '../support/python.ts';

requireDist();
const OUT = resolve(process.env.KILN_OUT ?? '.kiln/out');
// Read directly (kiln compare / kiln response --out): as fresh as its inputs, like dist/.
requireFreshOutput(`the build output ${OUT}`);
const SHOTS = '/tmp/shots';
/** The generator chunk's size limit before compression (issue budget). */
const GENERATOR_CHUNK_MAX_BYTES = 150 * 1024;
const session = siteSession();
const tmp = mkdtempSync(join(tmpdir(), 'kiln-response-page-'));
mkdirSync(SHOTS, { recursive: true });

interface Choice {
  release: string;
  detector: string;
  node: string;
  row: string;
  date: string;
  energies: 'model' | 'range' | 'edges';
  text?: string;
  group: string;
  rsp?: boolean;
}

async function fill(page: Page, c: Choice): Promise<void> {
  await page.selectOption('#rsp-release', c.release);
  await page.selectOption('#rsp-detector', c.detector);
  await page.selectOption('#rsp-node', c.node);
  await page.fill('#rsp-row', c.row);
  await page.fill('#rsp-date', c.date);
  await page.selectOption('#rsp-energies', c.energies);
  if (c.energies === 'range') await page.fill('#rsp-range', c.text!);
  if (c.energies === 'edges') await page.fill('#rsp-edges', c.text!);
  await page.selectOption('#rsp-group', c.group);
  if (c.rsp) await page.check('#rsp-rsp');
  else await page.uncheck('#rsp-rsp');
}

/** Builds in the page and returns the files it offers (name → bytes). */
async function buildInPage(page: Page, c: Choice): Promise<Map<string, Buffer>> {
  await fill(page, c);
  const before = (await page.locator('#rsp-result').getAttribute('data-done')) ?? '';
  await page.click('#rsp-build');
  await expect.poll(async () => (await page.locator('#rsp-result').getAttribute('data-done')) ?? '', { timeout: 180_000 }).not.toBe(before);
  const links = await page.locator('#rsp-files a[download]').evaluateAll((as) => as.map((a) => [a.getAttribute('download')!, (a as HTMLAnchorElement).href]));
  const out = new Map<string, Buffer>();
  for (const [name, href] of links) {
    const b64 = await page.evaluate(async (u) => {
      const b = new Uint8Array(await (await fetch(u)).arrayBuffer());
      let s = '';
      for (let i = 0; i < b.length; i += 0x8000) s += String.fromCharCode(...b.subarray(i, i + 0x8000));
      return btoa(s);
    }, href);
    out.set(name, Buffer.from(b64, 'base64'));
  }
  return out;
}

/** The same choice through `kiln response` in Node. */
function cli(c: Choice, dir: string): Map<string, Buffer> {
  const args = ['response', '--from', OUT, '--out', dir, '--release', c.release, '--detector', c.detector, '--date', c.date, '--group', c.group];
  if (c.node) args.push('--node', c.node);
  if (c.row) args.push('--row', c.row);
  if (c.energies === 'range') args.push('--energies', c.text!);
  if (c.energies === 'edges') {
    writeFileSync(join(tmp, 'edges.txt'), c.text!);
    args.push('--energy-grid', join(tmp, 'edges.txt'));
  }
  if (c.rsp) args.push('--rsp');
  const r = kiln(...args);
  if (r.status !== 0) throw new Error(`kiln response failed: ${r.stderr}`);
  return new Map(readdirSync(dir).map((f) => [f, readFileSync(join(dir, f))]));
}

const CASES: Choice[] = [
  { release: '2.1.0', detector: 'fi0', node: 'c', row: '700', date: '2027-03-10', energies: 'range', text: '0.3:10:400', group: '2', rsp: true },
  { release: '2.1.0', detector: 'bi1', node: '', row: '', date: '2028-02-29', energies: 'edges', text: '0.2\n0.3\n0.5\n1\n2\n4\n8\n', group: '4' },
  { release: '2.0.0', detector: 'fi0', node: 'a', row: '10', date: '2026-06-01', energies: 'model', group: '1' },
];

describe('custom response page', () => {
  it('the generator chunk is within its budget and loads only when a build is asked for', async () => {
    const chunks = readdirSync(join(DIST, '_astro')).filter((f) => /^generate.*\.js$/.test(f));
    expect(chunks.length).toBe(1);
    expect(statSync(join(DIST, '_astro', chunks[0])).size).toBeLessThanOrEqual(GENERATOR_CHUNK_MAX_BYTES);
    const { page, problems } = await session.open('/response/');
    const fetched = () => session.server.requests.filter((r) => r.includes('/_astro/generate') || r.endsWith('model.json'));
    const n0 = fetched().length;
    await page.waitForTimeout(300);
    expect(fetched().length).toBe(n0);
    await buildInPage(page, { release: '2.1.0', detector: 'fi0', node: 'a', row: '', date: '2027-01-15', energies: 'model', group: '1' });
    expect(fetched().length - n0).toBe(2);
    expect(problems).toEqual([]);
    await page.close();
  });

  it('a choice equal to a published product gives the published bytes, as kiln response does', async () => {
    const { page, problems } = await session.open('/response/');
    const c: Choice = { release: '2.1.0', detector: 'bi1', node: 'b', row: '', date: '2027-07-26', energies: 'model', group: '1' };
    const files = await buildInPage(page, c);
    const mine = cli(c, join(tmp, 'pub'));
    const pub = (name: string) => gunzipSync(readFileSync(join(DIST, 'releases', '2.1.0', 'files', name)));
    const rmf = files.get('quillon-tarncam_bi1-b_2027-07-26_2.1.0.rmf')!;
    const arf = files.get('quillon-tarncam_bi1-b_2027-07-26_2.1.0.arf')!;
    // Byte for byte: the core's exp/log/pow come from generators/numeric, not from the engine
    // (Chromium's Math.exp differs from Node 20's in the last bit for about 1 input in 10).
    expect(Buffer.compare(rmf, pub('quillon-tarncam_bi1-b_2.1.0.rmf.gz')), 'page RMF vs published').toBe(0);
    expect(Buffer.compare(arf, pub('quillon-tarncam_bi1_e3_2.1.0.arf.gz')), 'page ARF vs published').toBe(0);
    for (const [name, b] of files) expect(Buffer.compare(b, mine.get(name)!), `page vs kiln response: ${name}`).toBe(0);
    // kiln response itself gives the published bytes exactly (same engine).
    expect(Buffer.compare(mine.get('quillon-tarncam_bi1-b_2027-07-26_2.1.0.rmf')!, pub('quillon-tarncam_bi1-b_2.1.0.rmf.gz')), 'kiln response RMF vs published').toBe(0);
    expect(Buffer.compare(mine.get('quillon-tarncam_bi1-b_2027-07-26_2.1.0.arf')!, pub('quillon-tarncam_bi1_e3_2.1.0.arf.gz')), 'kiln response ARF vs published').toBe(0);
    await expect.poll(() => page.locator('#rsp-checks-summary').textContent()).toMatch(/0 failed/);
    expect(await page.locator('figure.kplot').count()).toBe(2);
    await page.screenshot({ path: `${SHOTS}/response-page.png`, fullPage: true });
    expect(problems).toEqual([]);
    await page.close();
  });

  it.each(CASES)('custom choice $release $detector node "$node" row "$row" $date $energies group $group: identical to kiln response, and astropy verifies it', async (c) => {
    const { page, problems } = await session.open('/response/');
    const files = await buildInPage(page, c);
    const dir = join(tmp, `${c.release}-${c.detector}-${c.date}`);
    const mine = cli(c, dir);
    expect([...files.keys()].sort()).toEqual([...mine.keys()].sort());
    for (const [name, b] of files) expect(Buffer.compare(b, mine.get(name)!), name).toBe(0);
    if (runAstropyChecks) {
      const pageDir = join(tmp, `page-${c.release}-${c.detector}-${c.date}`);
      mkdirSync(pageDir, { recursive: true });
      for (const [name, b] of files) writeFileSync(join(pageDir, name), b);
      const v = runPythonJson<{ name: string; error: string | null; sums: boolean }[]>(
        'astropy',
        `
import json, sys, os
from astropy.io import fits
d = json.load(sys.stdin)
res = []
for n in sorted(os.listdir(d)):
    err = None
    with fits.open(os.path.join(d, n), checksum=True) as h:
        try:
            h.verify('exception')
        except Exception as e:
            err = str(e)
        sums = all(x._checksum_valid and x._datasum_valid for x in h)
    res.append({'name': n, 'error': err, 'sums': bool(sums)})
print(json.dumps(res))
`,
        pageDir,
      );
      expect(v.length).toBe(files.size);
      for (const f of v) expect([f.name, f.error, f.sums]).toEqual([f.name, null, true]);
    }
    expect(problems).toEqual([]);
    await page.close();
  });

  it.each([
    ['row', { row: '5000' }, /row outside detector fi0.*5000.*\[0, 1023\]/],
    ['date', { date: '2020-01-01' }, /date outside the validity.*2020-01-01.*2026-05-12/],
    ['energies', { energies: 'range' as const, text: '3:1:10' }, /not increasing.*hi > lo/],
    ['energies', { energies: 'range' as const, text: '0.01:5:100' }, /leaves the model's data range.*0\.1, 12\.5/],
  ])('bad %s: one line next to the control naming value and what is allowed, no files', async (field, change, pattern) => {
    const { page, problems } = await session.open('/response/');
    await fill(page, { release: '2.1.0', detector: 'fi0', node: 'a', row: '', date: '2027-01-15', energies: 'model', group: '1', ...change });
    await page.click('#rsp-build');
    await expect.poll(() => page.locator(`#err-${field}`).textContent(), { timeout: 180_000 }).toMatch(pattern);
    expect(((await page.locator(`#err-${field}`).textContent()) ?? '').split('\n').length).toBe(1);
    expect(await page.locator('#rsp-files').count()).toBe(0);
    expect(await page.locator('#err-general').textContent()).toBe('');
    expect(problems).toEqual([]);
    await page.close();
  });
});
