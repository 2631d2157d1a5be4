/**
 * The compare page's impact section in Debian's chromium. For the pair the build computed, the
 * tables come from release B's spectral.json. For any other pair the page computes the impact in a
 * Web Worker from the two releases' published files, with progress, and its numbers must equal,
 * bit for bit, those of `kiln compare A B --impact --json` in Node (same engine, same files, same
 * deterministic math: generators/numeric). The main thread stays responsive meanwhile.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { DIST, requireDist } from './support/server.ts';
import { siteSession } from './support/browser.ts';
import { kiln } from '../pipeline/helpers.ts';
import { requireFreshOutput } from '../support/fresh-build.ts';

requireDist();
const OUT = resolve(process.env.KILN_OUT ?? '.kiln/out');
// Read directly (kiln compare / kiln response --out): as fresh as its inputs, like dist/.
requireFreshOutput(`the build output ${OUT}`);
const session = siteSession();

describe('compare page: impact on the reference sources', () => {
  it("the build's pair shows the build's numbers without computing anything", async () => {
    const spectral = JSON.parse(readFileSync(join(DIST, 'data', 'releases', '2.1.0', 'spectral.json'), 'utf8')) as { comparedWith: string };
    const { page, problems } = await session.open(`/compare/?a=${spectral.comparedWith}&b=2.1.0`);
    await expect.poll(() => page.locator('#compare-impact-params tbody tr').count()).toBeGreaterThan(0);
    expect(await page.locator('#impact-body').textContent()).toContain("Computed by the build (release 2.1.0's spectral.json)");
    expect(await page.locator('#impact-controls').isHidden()).toBe(true);
    expect(session.server.requests.some((r) => r.includes('/_astro/compute') || r.includes('impact-worker'))).toBe(false);
    expect(problems).toEqual([]);
    await page.close();
  });

  it('any other pair is computed in a worker, with progress, and equals kiln compare --impact bit for bit', async () => {
    const [a, b] = ['1.1.0', '2.1.0'];
    const cli = kiln('compare', a, b, '--impact', '--json', '--out', OUT);
    expect([0, 1], cli.stderr).toContain(cli.status);
    const expected = (JSON.parse(cli.stdout) as { impact: { impact: unknown[] } }).impact.impact;
    const { page, problems } = await session.open(`/compare/?a=${a}&b=${b}`);
    await page.locator('#impact-run').waitFor({ state: 'visible' });
    expect(await page.locator('#impact-body').textContent()).toMatch(/computed here, in this browser/);
    // A heartbeat on the main thread: gaps between ticks show whether the page stays responsive.
    await page.evaluate(() => {
      const w = window as unknown as { kilnGaps: number[] };
      w.kilnGaps = [];
      let last = performance.now();
      setInterval(() => {
        const now = performance.now();
        w.kilnGaps.push(now - last);
        last = now;
      }, 20);
    });
    await page.click('#impact-run');
    await expect.poll(() => page.locator('#impact-phase').textContent()).toMatch(/\(\d+ \/ \d+\)|…/);
    await page.locator('#impact-json').waitFor({ state: 'attached', timeout: 280_000 });
    const got = await page.evaluate(async () => (await (await fetch((document.getElementById('impact-json') as HTMLAnchorElement).href)).json()) as { impact: unknown[] });
    expect(got.impact).toEqual(expected);
    expect(await page.locator('#compare-impact-params tbody tr').count()).toBeGreaterThan(0);
    const gaps = await page.evaluate(() => (window as unknown as { kilnGaps: number[] }).kilnGaps);
    // The fits take seconds; the main thread never blocks for more than a frame budget's worth.
    expect(Math.max(...gaps), 'longest main-thread gap (ms)').toBeLessThan(250);
    expect(problems).toEqual([]);
    await page.close();
  });
});
