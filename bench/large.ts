/**
 * The large-instrument case of `npm run bench`: for each size, generate the content tree, run a
 * clean `kiln build` and a no-change rebuild (from the job cache) in child processes under GNU
 * time (wall, CPU, peak RSS of the largest process: the build's main thread and its workers share
 * one process), and measure the finder and index the site would load at that scale.
 */
import { spawnSync } from 'node:child_process';
import { cpSync, existsSync, readFileSync, rmSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { makeLargeInstrument, type LargeInstrument } from '../scripts/make-large-instrument.ts';
import { filesUnder, totalSize } from './io.ts';
import { round } from './measure.ts';

const GNU_TIME = '/usr/bin/time';
const KB_PER_MB = 1024;

interface Run {
  wallS: number;
  cpuS: number | null;
  peakRssMB: number | null;
  stdout: string;
}

/** Runs `cmd` under GNU time when present: wall, CPU (children) and peak RSS of the largest process. */
export function timedRun(cmd: string[], cwd: string, timeFile: string): Run {
  const haveTime = existsSync(GNU_TIME);
  const full = haveTime ? [GNU_TIME, '-f', '%e %U %S %M', '-o', timeFile, ...cmd] : cmd;
  const t0 = performance.now();
  const r = spawnSync(full[0], full.slice(1), { cwd, encoding: 'utf8', maxBuffer: 64 * 1024 * 1024 });
  const wallS = (performance.now() - t0) / 1000;
  if (r.status !== 0) throw new Error(`${cmd.slice(0, 3).join(' ')} exited with ${r.status ?? r.signal}:\n${r.stdout.slice(-2000)}\n${r.stderr.slice(-2000)}`);
  if (!haveTime) return { wallS: round(wallS), cpuS: null, peakRssMB: null, stdout: r.stdout };
  const [, user, sys, maxKb] = readFileSync(timeFile, 'utf8').trim().split('\n').pop()!.split(' ').map(Number);
  return { wallS: round(wallS), cpuS: round(user + sys), peakRssMB: round(maxKb / KB_PER_MB, 1), stdout: r.stdout };
}

/** A clean build, a no-change rebuild, and a build of the same content into a new output from the job cache, as one line's fields. */
const rebuildFields = (clean: Run, again: Run, fromJobs: Run) => ({
  wallS: clean.wallS,
  cpuS: clean.cpuS,
  peakRssMB: clean.peakRssMB,
  noChangeRebuildS: again.wallS,
  noChangeRebuildPeakRssMB: again.peakRssMB,
  noChangeRatio: round(again.wallS / clean.wallS, 3),
  jobCacheBuildS: fromJobs.wallS,
  jobCacheRatio: round(fromJobs.wallS / clean.wallS, 3),
});

/** Removes a case's content tree, its outputs and the cache. */
function removeBuild(content: string, out: string): void {
  for (const p of [content, out, `${out}.cache`, `${out}-new`]) rmSync(p, { recursive: true, force: true });
}

/**
 * Clean (--no-cache), then again with nothing changed (the output verified and left in place:
 * pipeline/build-stamp.ts), then into a new output with the same cache (every job, spectral
 * section and re-examination from the job cache, every file written).
 */
function threeBuilds(root: string, tmp: string, content: string, out: string): [Run, Run, Run] {
  const clean = timedBuild(root, tmp, content, out, ['--no-cache']);
  const again = timedBuild(root, tmp, content, out, []);
  const fromJobs = timedBuild(root, tmp, content, `${out}-new`, ['--cache', `${out}.cache`]);
  return [clean, again, fromJobs];
}

const timedBuild = (root: string, tmp: string, content: string, out: string, extra: string[]): Run =>
  timedRun([process.execPath, join(root, 'bin', 'kiln.mjs'), 'build', '--content', content, '--out', out, '--quiet', ...extra], root, join(tmp, 'large.time'));

export function largeLines(root: string, tmp: string, sizes: LargeInstrument[]): Record<string, unknown>[] {
  return sizes.map((size) => {
    const name = `large-${size.detectors}x${size.epochs}`;
    const content = join(tmp, `${name}-content`);
    const out = join(tmp, `${name}-out`);
    const products = makeLargeInstrument(content, size);
    const [clean, again, fromJobs] = threeBuilds(root, tmp, content, out);
    const finder = filesUnder(join(out, 'finder'));
    const releaseFiles = filesUnder(join(out, 'releases'));
    // What pages fetch: each release's summary.json and the per-detector documents (validation.json
    // and manifest.json are downloads, not loaded by a page).
    const fetched = releaseFiles.filter((f) => f.endsWith('/summary.json') || /\/detectors\/.+\.json$/.test(f));
    const line = {
      case: `large-instrument ${name}`,
      products,
      jobs: size.detectors,
      grid: `${size.channels}x${size.bins}`,
      ...rebuildFields(clean, again, fromJobs),
      indexBytes: statSync(join(out, 'index.json')).size,
      finderFiles: finder.length,
      finderBytes: totalSize(finder),
      largestFinderBytes: Math.max(...finder.map((f) => statSync(f).size)),
      summaryBytes: statSync(join(out, 'releases', '1.0.0', 'summary.json')).size,
      fetchedDocs: fetched.length,
      fetchedDocsBytes: totalSize(fetched),
      largestFetchedDocBytes: Math.max(...fetched.map((f) => statSync(f).size)),
      outputBytes: totalSize(releaseFiles),
      note: 'clean build (--no-cache); a rebuild with nothing changed (output verified in place); a build into a new output from the job cache; peak RSS of the build process under GNU time',
    };
    removeBuild(content, out);
    return line;
  });
}

/** The demo content copied to `tmp`: a clean build, then a rebuild with nothing changed. */
export function demoRebuildLine(root: string, tmp: string): Record<string, unknown> {
  const content = join(tmp, 'demo-content');
  const out = join(tmp, 'demo-out');
  cpSync(join(root, 'content'), content, { recursive: true });
  const [clean, again, fromJobs] = threeBuilds(root, tmp, content, out);
  removeBuild(content, out);
  return {
    case: 'demo-rebuild',
    ...rebuildFields(clean, again, fromJobs),
    note: 'demo content: clean build (--no-cache); nothing changed (output verified in place); into a new output from the cache (jobs, spectral sections, re-examinations); wall time of the whole process',
  };
}
