/** A tiny static file server for dist/ on 127.0.0.1 and a random free port (tests only). */
import { createServer, type Server } from 'node:http';
import { existsSync, readFileSync, statSync } from 'node:fs';
import { extname, join, normalize, resolve } from 'node:path';
import type { AddressInfo } from 'node:net';
import { requireFreshBuild } from '../../support/fresh-build.ts';

const TYPES: Record<string, string> = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.json': 'application/json; charset=utf-8',
  '.png': 'image/png',
  '.svg': 'image/svg+xml',
  '.txt': 'text/plain; charset=utf-8',
  '.gz': 'application/gzip',
};

export const DIST = resolve('dist');

/** Fails with the message CI and developers need when the site was not built, or (for the
 * repository's dist/) built before its last input changed. */
export function requireDist(dist = DIST): void {
  if (!existsSync(join(dist, 'index.html'))) throw new Error(`${dist === DIST ? 'dist/' : dist} is missing: run npm run build first (the browser tests use the built site).`);
  if (dist === DIST) requireFreshBuild(join(DIST, 'index.html'), 'the built site dist/');
}

export type SiteServer = { url: string; close: () => Promise<void>; requests: string[] };

/** Serves `dist` (default: the repository's dist/) after checking it was built. */
export async function serveDist(dist = DIST): Promise<SiteServer> {
  requireDist(dist);
  return serveDir(dist);
}

/** Serves any built site directory (a fixture site built by a test, say). */
export async function serveDir(root: string): Promise<SiteServer> {
  const DIST = resolve(root);
  const requests: string[] = [];
  const server: Server = createServer((req, res) => {
    const path = decodeURIComponent(new URL(req.url ?? '/', 'http://x').pathname);
    requests.push(path);
    let file = normalize(join(DIST, path));
    if (!file.startsWith(DIST)) return void res.writeHead(403).end();
    if (existsSync(file) && statSync(file).isDirectory()) file = join(file, 'index.html');
    if (!existsSync(file)) return void res.writeHead(404, { 'Content-Type': 'text/plain' }).end('not found');
    // .gz products are served as opaque bytes (no Content-Encoding), like a plain static host.
    res.writeHead(200, { 'Content-Type': TYPES[extname(file)] ?? 'application/octet-stream' });
    res.end(readFileSync(file));
  });
  await new Promise<void>((ok) => server.listen(0, '127.0.0.1', ok));
  const { port } = server.address() as AddressInfo;
  return { url: `http://127.0.0.1:${port}`, requests, close: () => new Promise((ok) => server.close(() => ok())) };
}
