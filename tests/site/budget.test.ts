/**
 * Byte budget of the built site (a size check, not a timing): every release page's HTML plus the
 * CSS and JavaScript it loads must stay within 300 KB before compression. Downloads and the matrix
 * images are excluded. Uses dist/ as built by `npm run build` (from KILN_OUT, default .kiln/out).
 * Counted: what the page loads by itself (static imports, transitively). Not counted: chunks behind
 * a dynamic import(), which load only on demand — on release pages the published-RMF reader
 * (src/lib/published-row, with the FITS and OGIP readers) loads only when the reader adds a
 * profile energy. The test checks that such chunks really are outside the page's static graph and
 * reports their size.
 */
import { describe, expect, it } from 'vitest';
import { existsSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { requireFreshBuild } from '../support/fresh-build.ts';
import { dirname, join, resolve } from 'node:path';

const DIST = resolve('dist');
/** The budget stated for the site (300 KB, taken as 300 000 bytes to stay on the strict side). */
const RELEASE_PAGE_BUDGET_BYTES = 300_000;

/** CSS and JS reachable from a page: <link rel=stylesheet>, <script src>, and JS imports, transitively. */
export function pageAssets(htmlFile: string): string[] {
  const html = readFileSync(htmlFile, 'utf8');
  const todo = [
    ...[...html.matchAll(/<link[^>]+rel="stylesheet"[^>]*href="([^"]+)"/g)].map((m) => m[1]),
    ...[...html.matchAll(/<script[^>]+src="([^"]+)"/g)].map((m) => m[1]),
    ...[...html.matchAll(/import\s*(?:[^'"]*from\s*)?["']([^"']+\.js)["']/g)].map((m) => m[1]),
  ].map((u) => join(DIST, u));
  const seen = new Set<string>();
  while (todo.length) {
    const f = todo.pop()!;
    if (seen.has(f) || !existsSync(f)) continue;
    seen.add(f);
    if (f.endsWith('.js')) {
      const js = readFileSync(f, 'utf8');
      // Static imports only: dynamic import() chunks load on demand and are not part of the page.
      for (const m of js.matchAll(/(?:^|[;\s])import\s*(?:[^'"()]*?from\s*)?["'](\.{1,2}\/[^"']+)["']/g)) todo.push(resolve(dirname(f), m[1]));
    }
  }
  return [...seen];
}

/** Chunks a page's static JS names in a dynamic import("./x.js"): loaded only on demand. */
export function onDemandChunks(staticAssets: string[]): string[] {
  const out = new Set<string>();
  for (const f of staticAssets.filter((a) => a.endsWith('.js')))
    for (const m of readFileSync(f, 'utf8').matchAll(/import\(\s*["'](\.{1,2}\/[^"']+\.js)["']\s*\)/g)) out.add(resolve(dirname(f), m[1]));
  return [...out];
}

/** Static closure of one JS file (the file and what it imports statically). */
function jsClosure(file: string): string[] {
  const seen = new Set<string>();
  const todo = [file];
  while (todo.length) {
    const f = todo.pop()!;
    if (seen.has(f) || !existsSync(f)) continue;
    seen.add(f);
    for (const m of readFileSync(f, 'utf8').matchAll(/(?:^|[;\s])import\s*(?:[^'"()]*?from\s*)?["'](\.{1,2}\/[^"']+)["']/g)) todo.push(resolve(dirname(f), m[1]));
  }
  return [...seen];
}

describe('site byte budget', () => {
  it('dist/ exists', () => {
    if (!existsSync(join(DIST, 'index.html'))) throw new Error('dist/ is missing: run npm run build first');
    requireFreshBuild(join(DIST, 'index.html'), 'the built site dist/');
  });
  const relDir = join(DIST, 'releases');
  const ids = existsSync(relDir) ? readdirSync(relDir).filter((d) => existsSync(join(relDir, d, 'index.html'))) : [];
  it('has release pages to measure', () => expect(ids.length).toBeGreaterThan(0));
  for (const id of ids)
    it(`release ${id}: HTML + CSS + JS ≤ ${RELEASE_PAGE_BUDGET_BYTES} bytes`, () => {
      const page = join(relDir, id, 'index.html');
      const assets = pageAssets(page);
      expect(assets.some((a) => a.endsWith('.css'))).toBe(true);
      expect(assets.some((a) => a.endsWith('.js'))).toBe(true);
      const total = [page, ...assets].reduce((s, f) => s + statSync(f).size, 0);
      console.log(`release ${id}: ${statSync(page).size} B HTML + ${total - statSync(page).size} B CSS/JS = ${total} B`);
      expect(total).toBeLessThanOrEqual(RELEASE_PAGE_BUDGET_BYTES);
    });
  for (const id of ids)
    it(`release ${id}: the published-RMF reader is an on-demand chunk, outside the counted bytes`, () => {
      const assets = pageAssets(join(relDir, id, 'index.html'));
      const lazy = onDemandChunks(assets).filter((f) => /published-row/.test(f));
      expect(lazy.length, 'a dynamic import of the published-row chunk').toBe(1);
      const extra = jsClosure(lazy[0]).filter((f) => !assets.includes(f));
      // The chunk and its own imports (the FITS/OGIP readers) are not loaded with the page.
      expect(extra).toContain(lazy[0]);
      expect(extra.length).toBeGreaterThan(1);
      const bytes = extra.reduce((s, f) => s + statSync(f).size, 0);
      console.log(`release ${id}: on demand (add a profile energy) ${extra.length} chunks, ${bytes} B`);
    });
});
