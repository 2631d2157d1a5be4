/**
 * The custom-response page in Debian's chromium (the budget: a 1024-channel × 800-energy
 * RMF with every component and its ARF built in ≤ 2 s, no main-thread task over 100 ms). Serves the
 * built site, picks the same case as `kiln response` in the bench, and times click → files offered,
 * three times: the first includes fetching the generator chunk and the model document.
 * Long tasks come from the browser's own PerformanceObserver ('longtask': tasks over 50 ms).
 */
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { chromium } from 'playwright-core';
import { serveDir } from '../tests/browser/support/server.ts';
import { RESPONSE_CASE } from './cases.ts';
import { round } from './measure.ts';

const CHROMIUM = '/usr/bin/chromium';
const ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run'];
/** Builds timed per run (the first is cold). */
const RUNS = 3;

export interface PageBuild {
  buildS: number[];
  longestTaskMs: number;
  longTasks: number;
  matrix: string;
}

export async function responsePageCase(siteDir: string): Promise<PageBuild | null> {
  const dist = join(siteDir, 'dist');
  if (!existsSync(join(dist, 'response', 'index.html')) || !existsSync(CHROMIUM)) return null;
  const server = await serveDir(dist);
  const profile = mkdtempSync(join(tmpdir(), 'kiln-bench-chromium-'));
  const context = await chromium.launchPersistentContext(profile, { executablePath: CHROMIUM, headless: true, args: ARGS });
  try {
    const page = await context.newPage();
    await page.addInitScript(() => {
      const w = window as unknown as { kilnLongTasks: number[] };
      w.kilnLongTasks = [];
      new PerformanceObserver((l) => l.getEntries().forEach((e) => w.kilnLongTasks.push(e.duration))).observe({ type: 'longtask', buffered: true });
    });
    await page.goto(`${server.url}/response/`);
    await page.selectOption('#rsp-release', RESPONSE_CASE.release);
    await page.selectOption('#rsp-detector', RESPONSE_CASE.detector);
    await page.fill('#rsp-date', RESPONSE_CASE.date);
    await page.selectOption('#rsp-energies', 'model');
    await page.selectOption('#rsp-group', '1');
    await page.evaluate(() => ((window as unknown as { kilnLongTasks: number[] }).kilnLongTasks.length = 0));
    const buildS: number[] = [];
    for (let i = 0; i < RUNS; i++) {
      const ms = await page.evaluate(
        () =>
          new Promise<number>((resolve) => {
            const result = document.getElementById('rsp-result')!;
            const before = result.getAttribute('data-done');
            const t0 = performance.now();
            new MutationObserver((_, obs) => {
              if (result.getAttribute('data-done') !== before) {
                obs.disconnect();
                resolve(performance.now() - t0);
              }
            }).observe(result, { attributes: true });
            (document.getElementById('rsp-build') as HTMLButtonElement).click();
          }),
      );
      buildS.push(round(ms / 1000, 3));
    }
    const tasks = await page.evaluate(() => (window as unknown as { kilnLongTasks: number[] }).kilnLongTasks);
    const matrix = (await page.locator('#rsp-phase').textContent())?.match(/\d+ channels × \d+ energies/)?.[0] ?? 'unknown';
    return { buildS, longestTaskMs: round(Math.max(0, ...tasks), 1), longTasks: tasks.length, matrix };
  } finally {
    await context.close();
    rmSync(profile, { recursive: true, force: true });
    await server.close();
  }
}
