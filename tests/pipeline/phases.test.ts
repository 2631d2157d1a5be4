/**
 * kill -9 at each named phase of publish, build and the site build (the KILN_STOP_AT hook of
 * generators/pipeline/phase.ts: the process SIGKILLs itself on reaching the phase, an exact moment
 * rather than a random one). After each kill: nothing half-written where users look (release.yaml
 * is the old or the new file, --out and dist/ the old tree or recoverable), and the next run of
 * the same step finishes or cleanly redoes the work and removes the litter (staging folders,
 * temporary build folders, temporary files, locks).
 */
import { spawnSync } from 'node:child_process';
import { appendFileSync, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { KILN, REPO, stagingLeft, treeDigest, workspace, type Workspace } from './helpers.ts';

const CANDIDATE = '2.0.0';
const YAML = `releases/${CANDIDATE}/release.yaml`;
const spaces: Workspace[] = [];
afterAll(() => spaces.forEach((w) => w.dispose()));

/** kiln with a private TMPDIR (to see publish's temporary folders) and optionally a stop phase. */
function run(args: string[], tmp: string, stopAt?: string) {
  const env: NodeJS.ProcessEnv = { ...process.env, TMPDIR: tmp };
  delete env.KILN_STOP_AT;
  if (stopAt) env.KILN_STOP_AT = stopAt;
  return spawnSync(process.execPath, [KILN, ...args], { cwd: REPO, encoding: 'utf8', env, maxBuffer: 64 * 1024 * 1024 });
}

/** The demo candidate has open review items: publishing it takes a sign-off (README "Review sign-off"). */
const SIGN_OFF = ['--accept-all', '--reason', 'phase test'];

function fresh(): { ws: Workspace; tmp: string } {
  const ws = workspace();
  spaces.push(ws);
  const tmp = join(ws.dir, 'tmp');
  mkdirSync(tmp);
  return { ws, tmp };
}

/** Hidden litter in a folder: staging copies, temporary files, locks. */
const litter = (dir: string) => (existsSync(dir) ? readdirSync(dir).filter((n) => /\.staging-|\.tmp-|\.lock$|\.previous$/.test(n)) : []);

describe('kiln publish killed at each phase, then run again', () => {
  for (const phase of ['publish:built', 'publish:staged', 'publish:archived', 'publish:status-temp'])
    it(`${phase}: release.yaml stays whole; the next \`kiln publish ${CANDIDATE}\` finishes and leaves no litter`, () => {
      const { ws, tmp } = fresh();
      const killed = run(['publish', CANDIDATE, '--content', ws.content, ...ws.cacheArgs, ...SIGN_OFF, '--quiet'], tmp, phase);
      expect(killed.signal, killed.stderr).toBe('SIGKILL');
      // release.yaml is a complete YAML document with the old or the new status, never partial.
      const doc = parse(ws.read(YAML)) as { status: string };
      expect(['candidate', 'published']).toContain(doc.status);
      const archived = existsSync(ws.path(`archive/${CANDIDATE}`));
      expect(archived).toBe(phase === 'publish:archived' || phase === 'publish:status-temp');

      const again = run(['publish', CANDIDATE, '--content', ws.content, ...ws.cacheArgs, ...SIGN_OFF, '--quiet'], tmp);
      expect(again.status, again.stderr).toBe(0);
      expect(again.stdout).toMatch(archived ? /finished an interrupted publish/ : /frozen: \d+ files sealed/);
      expect((parse(ws.read(YAML)) as { status: string }).status).toBe('published');
      expect(readdirSync(ws.path('archive')).sort()).toEqual(['1.0.0', '1.1.0', CANDIDATE]);
      expect(litter(ws.content)).toEqual([]);
      expect(litter(ws.path(`releases/${CANDIDATE}`))).toEqual([]);
      expect(readdirSync(tmp).filter((n) => n.startsWith('kiln-publish-'))).toEqual([]);
      // And the archive is complete: a build serves it (it verifies every sealed byte first).
      if (phase === 'publish:status-temp') {
        const b = run(['build', '--content', ws.content, '--out', ws.out], tmp);
        expect(b.status, b.stderr).toBe(0);
        expect(b.stderr).toMatch(/release 2\.0\.0 \(published\): 10 archived products verified/);
      }
    });
});

describe('kiln build killed at each phase, then run again', () => {
  const base = fresh();
  for (const phase of ['build:verified', 'build:staged', 'build:swap'])
    it(`${phase}: the previous output is in place or recoverable; the next build recovers and cleans up`, () => {
      const { ws, tmp } = base;
      if (!existsSync(ws.out)) expect(run(['build', '--content', ws.content, '--out', ws.out, '--quiet'], tmp).status).toBe(0);
      const before = treeDigest(ws.out);
      // A file the build does not read changes: the build record no longer matches (a real build
      // runs through every phase; pipeline/build-stamp.ts), and the output bytes stay the same.
      appendFileSync(ws.path('README.md'), `\nedited before the build killed at ${phase}\n`);
      const killed = run(['build', '--content', ws.content, '--out', ws.out, '--quiet'], tmp, phase);
      expect(killed.signal, killed.stderr).toBe('SIGKILL');
      if (phase === 'build:swap') {
        // Cut between the renames: the previous tree waits in its side folder.
        expect(existsSync(ws.out)).toBe(false);
        expect(treeDigest(join(ws.dir, '.out.previous'))).toEqual(before);
      } else expect(treeDigest(ws.out)).toEqual(before);
      const again = run(['build', '--content', ws.content, '--out', ws.out, '--quiet'], tmp);
      expect(again.status, again.stderr).toBe(0);
      expect(treeDigest(ws.out)).toEqual(before); // identical inputs give identical bytes
      expect(stagingLeft(ws.out)).toEqual([]);
      expect(litter(ws.dir)).toEqual([]);
    });
});

describe('the site build killed at each phase, then run again', () => {
  const dir = mkdtempSync(join(tmpdir(), 'kiln-site-phases-'));
  const dist = join(dir, 'dist');
  afterAll(() => rmSync(dir, { recursive: true, force: true }));
  const site = (stopAt?: string) => {
    const env: NodeJS.ProcessEnv = { ...process.env, KILN_SITE_DIST: dist };
    delete env.KILN_STOP_AT;
    if (stopAt) env.KILN_STOP_AT = stopAt;
    return spawnSync(process.execPath, [join(REPO, 'scripts', 'build-site.mjs')], { cwd: REPO, encoding: 'utf8', env });
  };
  it('site:staged then site:swap: dist/ is kept, then recovered first thing by the next run', () => {
    if (!existsSync(join(REPO, '.kiln', 'out', 'index.json'))) throw new Error('.kiln/out is missing: run npm run build first');
    const first = site();
    expect(first.status, first.stderr).toBe(0);
    const index = readFileSync(join(dist, 'index.html'));
    const staged = site('site:staged');
    expect(staged.signal).toBe('SIGKILL');
    expect(readFileSync(join(dist, 'index.html')).equals(index)).toBe(true);
    const stagedLeft = readdirSync(dir).filter((n) => n.includes('.staging-'));
    expect(stagedLeft.length).toBe(1);
    const swapped = site('site:swap');
    expect(swapped.signal).toBe('SIGKILL');
    expect(existsSync(dist)).toBe(false);
    // The first killed run's staging folder was removed by this run before it built its own; this
    // run's complete staging folder waits beside the previous tree it moved aside.
    const left = readdirSync(dir).sort();
    expect(left.filter((n) => !n.includes('.staging-'))).toEqual(['.dist.lock', '.dist.previous']);
    expect(left.filter((n) => n.includes('.staging-')).length).toBe(1);
    expect(left).not.toContain(stagedLeft[0]);
    const again = site();
    expect(again.status, again.stderr).toBe(0);
    expect(readdirSync(dir)).toEqual(['dist']);
    expect(existsSync(join(dist, 'index.html'))).toBe(true);
    // Four Astro builds of the whole demo site, one after the other.
  }, 300_000);
});
