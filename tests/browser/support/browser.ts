/** Headless Debian chromium through playwright-core (never a downloaded browser). */
import { afterAll, beforeAll } from 'vitest';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { serveDist, type SiteServer } from './server.ts';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

export const CHROMIUM = '/usr/bin/chromium';
const ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run'];

/** A fresh profile directory per launch (playwright passes it as --user-data-dir). */
export async function launch(opts: { javaScriptEnabled?: boolean } = {}): Promise<{ context: BrowserContext; close: () => Promise<void> }> {
  const profile = mkdtempSync(join(tmpdir(), 'kiln-chromium-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM,
    headless: true,
    args: ARGS,
    viewport: { width: 1280, height: 900 },
    acceptDownloads: true,
    javaScriptEnabled: opts.javaScriptEnabled ?? true,
  });
  return {
    context,
    close: async () => {
      await context.close();
      rmSync(profile, { recursive: true, force: true });
    },
  };
}

/** Collects console errors, page errors and failed or off-site requests of a page. */
export function watch(page: Page, origin: string): { problems: string[] } {
  const problems: string[] = [];
  page.on('console', (m) => {
    if (m.type() === 'error') problems.push(`console: ${m.text()}`);
  });
  page.on('pageerror', (e) => problems.push(`pageerror: ${e.message}`));
  page.on('requestfailed', (r) => problems.push(`failed: ${r.url()} ${r.failure()?.errorText ?? ''}`));
  page.on('response', (r) => {
    if (r.status() >= 400) problems.push(`HTTP ${r.status()}: ${r.url()}`);
  });
  page.on('request', (r) => {
    const u = r.url();
    if (!u.startsWith(origin) && !u.startsWith('data:') && !u.startsWith('blob:')) problems.push(`off-site request: ${u}`);
  });
  return { problems };
}

/**
 * The served dist/ (or the site directory `dir()` names when the session starts: a fixture site
 * built in an earlier beforeAll) and one browser for a test file, started before its tests and
 * closed after them (registers the vitest hooks). `open` loads a page and watches it for problems.
 */
export function siteSession(dir?: () => string): {
  readonly url: string;
  readonly context: BrowserContext;
  readonly server: SiteServer;
  open(path: string): Promise<{ page: Page; problems: string[] }>;
} {
  let server: SiteServer | undefined;
  let browser: Awaited<ReturnType<typeof launch>> | undefined;
  beforeAll(async () => {
    server = await serveDist(dir?.());
    browser = await launch();
  });
  afterAll(async () => {
    await browser?.close();
    await server?.close();
  });
  const session = {
    get url() {
      return session.server.url;
    },
    get context() {
      if (!browser) throw new Error('browser not started (use inside tests)');
      return browser.context;
    },
    get server() {
      if (!server) throw new Error('server not started (use inside tests)');
      return server;
    },
    async open(path: string) {
      const page = await session.context.newPage();
      const { problems } = watch(page, session.url);
      await page.goto(session.url + path, { waitUntil: 'networkidle' });
      return { page, problems };
    },
  };
  return session;
}
