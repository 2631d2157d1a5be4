/**
 * Release notes are content: Markdown that may carry raw HTML. The site renders them through
 * remark → remark-rehype (raw HTML dropped) → rehype-sanitize (GitHub's schema) and must let no
 * element, event handler or javascript: URL from them reach the page. The demo notes hold no HTML,
 * so this test builds its own hostile fixture: a copy of the demo content whose newest release's
 * notes carry the usual injection vectors (OWASP XSS Filter Evasion Cheat Sheet: script, img
 * onerror, svg onload, iframe and anchor javascript: URLs, inline event handlers, style), builds it
 * (`kiln build`, then the site step into a scratch dist), and opens the release page in Debian's
 * chromium. The notes' plain text must be on the page (so the notes were rendered at all) and
 * nothing from the raw HTML may have become DOM or run.
 */
import { readdirSync, writeFileSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { REPO, kiln, workspace, type Workspace } from '../pipeline/helpers.ts';
import { siteSession } from './support/browser.ts';

const MARKER = 'KILN-HOSTILE-MARKER';
const HOSTILE_NOTES = `# Hostile notes (test fixture, invented)

Plain text before. ${MARKER}

<script>window.__kilnInjected = 'script'</script>
<img src="x" onerror="window.__kilnInjected = 'img'">
<svg onload="window.__kilnInjected = 'svg'"><circle r="5"/></svg>
<iframe src="javascript:window.top.__kilnInjected = 'iframe'"></iframe>
<a href="javascript:window.__kilnInjected = 'raw-anchor'" id="raw-anchor">raw anchor</a>
<div onclick="window.__kilnInjected = 'div'" id="raw-div">raw div</div>
<style>body { display: none }</style>

[markdown link](javascript:window.__kilnInjected='md-link')

![markdown image](x" onerror="window.__kilnInjected='md-img')

Plain text after.
`;

let ws: Workspace;
let release = '';

beforeAll(() => {
  ws = workspace();
  release = readdirSync(join(ws.content, 'releases')).sort().at(-1)!;
  writeFileSync(join(ws.content, 'releases', release, 'notes.md'), HOSTILE_NOTES);
  const b = kiln('build', '--content', ws.content, '--out', ws.out, '--quiet');
  if (b.status !== 0) throw new Error(`fixture build failed:\n${b.stderr}`);
  const s = spawnSync(process.execPath, ['scripts/build-site.mjs'], {
    cwd: REPO,
    encoding: 'utf8',
    env: { ...process.env, KILN_OUT: ws.out, KILN_SITE_DIST: join(ws.dir, 'dist') },
  });
  if (s.status !== 0) throw new Error(`fixture site build failed:\n${s.stderr}${s.stdout}`);
}, 300_000);
afterAll(() => ws?.dispose());

const site = siteSession(() => join(ws.dir, 'dist'));

describe('hostile release notes (built fixture, chromium)', () => {
  it('show their text and let no raw HTML, handler or script through', async () => {
    const { page, problems } = await site.open(`/releases/${release}/`);
    const notes = page.locator('.notes');
    expect(await notes.count()).toBe(1);
    expect(await notes.innerText()).toContain(MARKER);
    expect(await page.$$eval('.notes script, .notes img, .notes svg, .notes iframe, .notes style, .notes #raw-div', (n) => n.length)).toBe(0);
    expect(await page.$$eval('.notes *', (els) => els.flatMap((e) => [...e.attributes].map((a) => a.name)).filter((n) => n.startsWith('on')))).toEqual([]);
    expect(await page.$$eval('.notes a', (as) => as.map((a) => a.getAttribute('href') ?? '').filter((h) => /^\s*javascript:/i.test(h)))).toEqual([]);
    // Clicking whatever links are left runs nothing either.
    for (const a of await page.locator('.notes a').all()) await a.click({ noWaitAfter: true }).catch(() => {});
    expect(await page.evaluate(() => (window as unknown as { __kilnInjected?: string }).__kilnInjected)).toBeUndefined();
    expect(await page.locator('body').isVisible()).toBe(true);
    expect(problems.filter((p) => !p.includes('/x'))).toEqual([]);
    await page.close();
  });
});
