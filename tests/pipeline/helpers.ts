/**
 * Helpers for the release-pipeline tests: scratch copies of the demo content, the kiln CLI as a
 * child process (cwd = repository root), and byte-level snapshots of output trees.
 */
import type { ReleaseSite } from '../../generators/site-data/types.ts';
import { readReleaseSite } from '../../generators/pipeline/site-files.ts';
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { createHash } from 'node:crypto';
import { cpSync, existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';

export const REPO = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
/**
 * The demo content tree copied by every test: content/ of the working tree, or another tree named
 * by KILN_TEST_CONTENT (e.g. a `git archive HEAD content` export while others edit content/).
 */
export const DEMO_CONTENT = process.env.KILN_TEST_CONTENT ?? join(REPO, 'content');
export const KILN = join(REPO, 'bin', 'kiln.mjs');

export interface CliResult {
  status: number | null;
  signal: NodeJS.Signals | null;
  stdout: string;
  stderr: string;
}

/** `node bin/kiln.mjs ARGS...` from the repository root. */
export function kiln(...args: string[]): CliResult {
  const r = spawnSync(process.execPath, [KILN, ...args], { cwd: REPO, encoding: 'utf8', maxBuffer: 64 * 1024 * 1024 });
  return { status: r.status, signal: r.signal, stdout: r.stdout, stderr: r.stderr };
}

/** The same, not waited for (crash tests). */
export function kilnAsync(...args: string[]): ChildProcess {
  return spawn(process.execPath, [KILN, ...args], { cwd: REPO, stdio: ['ignore', 'pipe', 'pipe'] });
}

/** A fresh temporary workspace holding a copy of the demo content at `<ws>/content`. */
export interface Workspace {
  dir: string;
  content: string;
  out: string;
  path(rel: string): string;
  read(rel: string): string;
  write(rel: string, text: string): void;
  /** Replaces the first occurrence of `from`, which must exist (a missed edit would test nothing). */
  replace(rel: string, from: string | RegExp, to: string): void;
  /** `--cache <dir>/out.cache` for builds and publishes outside `out` (empty when cold). */
  cacheArgs: string[];
  dispose(): void;
}

/**
 * The job cache `npm run build` leaves beside its output (.kiln/cache for .kiln/out). Seeding a
 * workspace's cache with it makes a build of unchanged demo content take seconds instead of a
 * clean build's half minute: entries are keyed by each job's fingerprint (resolved model, grids,
 * generator version including every source file of generators/) and verified by their SHA-256
 * before use, so a stale or foreign entry is simply not used, and a build from the cache writes
 * the same bytes as a clean one (tests/pipeline/cache.test.ts). Tests of clean builds themselves
 * (determinism, the cache, shards, crash timing) ask for a cold workspace.
 */
export const SEED_CACHE = process.env.KILN_TEST_SEED_CACHE ?? join(REPO, '.kiln', 'cache');

export interface WorkspaceOptions {
  /** 'warm' (default): `<out>.cache` starts as a copy of SEED_CACHE when it exists; 'cold': no cache. */
  cache?: 'warm' | 'cold';
}

export function workspace(opts: WorkspaceOptions = {}): Workspace {
  const dir = mkdtempSync(join(tmpdir(), 'kiln-pipeline-'));
  const content = join(dir, 'content');
  cpSync(DEMO_CONTENT, content, { recursive: true });
  // The whole cache (jobs, spectral sections, re-examinations): each kind verifies its own entries.
  const warm = (opts.cache ?? 'warm') === 'warm';
  if (warm && existsSync(SEED_CACHE)) cpSync(SEED_CACHE, join(dir, 'out.cache'), { recursive: true });
  const ws: Workspace = {
    dir,
    content,
    out: join(dir, 'out'),
    path: (rel) => join(content, rel),
    read: (rel) => readFileSync(join(content, rel), 'utf8'),
    write: (rel, text) => writeFileSync(join(content, rel), text),
    replace(rel, from, to) {
      const t = ws.read(rel);
      const found = typeof from === 'string' ? t.includes(from) : from.test(t);
      if (!found) throw new Error(`test setup: ${String(from)} not found in ${rel}`);
      ws.write(rel, t.replace(from, to));
    },
    cacheArgs: warm ? ['--cache', join(dir, 'out.cache')] : [],
    dispose: () => rmSync(dir, { recursive: true, force: true }),
  };
  return ws;
}

/** Every file under `root` (relative path → bytes), sorted by path. */
export function readTree(root: string): Map<string, Buffer> {
  const out = new Map<string, Buffer>();
  const walk = (d: string) => {
    for (const name of readdirSync(d).sort()) {
      const p = join(d, name);
      if (statSync(p).isDirectory()) walk(p);
      else out.set(relative(root, p).split('\\').join('/'), readFileSync(p));
    }
  };
  walk(root);
  return out;
}

/** Relative path → SHA-256 of every file under `root` (compact comparison of whole trees). */
export function treeDigest(root: string): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [p, b] of readTree(root)) out[p] = sha256(b);
  return out;
}

export function sha256(b: Uint8Array): string {
  return createHash('sha256').update(b).digest('hex');
}

/** Staging directories of builds into `out` left in its parent (atomic.ts naming: .<base>.staging-<pid>). */
export function stagingLeft(out: string): string[] {
  const parent = dirname(out);
  if (!existsSync(parent)) return [];
  return readdirSync(parent).filter((n) => n.includes('.staging-') || n.endsWith('.previous'));
}

/**
 * A user-mistake report: exactly one non-empty line, no stack trace ("    at " frames are what
 * Node prints for an uncaught error — common practice, no source).
 */
export function expectOneLine(stderr: string): string {
  const lines = stderr.split('\n').filter((l) => l.trim() !== '');
  if (lines.some((l) => /^\s+at /.test(l))) throw new Error(`stack trace on stderr:\n${stderr}`);
  if (lines.length !== 1) throw new Error(`expected one line on stderr, got ${lines.length}:\n${stderr}`);
  return lines[0];
}

/** A built release's site data joined from its split documents (summary + per-detector files). */
export function servedSite(outDir: string, id: string): ReleaseSite {
  return readReleaseSite(join(outDir, 'releases', id)).site;
}
