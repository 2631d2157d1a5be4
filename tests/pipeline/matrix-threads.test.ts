/**
 * One matrix on several threads (generators/pipeline/matrix-threads.ts): the FITS bytes equal the
 * single-thread build's for the demo's detectors (tails, shelf, escape peak, transfer loss), also
 * for an uneven split; a worker that fails makes the build fail with a clear error and no matrix.
 * The reference is the single-thread product path itself (model/parts.ts regionRedistribution).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { Worker } from 'node:worker_threads';
import { createHash } from 'node:crypto';
import { readFileSync, writeFileSync } from 'node:fs';
import { buildRedistributionThreaded, MIN_THREADED_CELLS, rowChunks, type MatrixThreadOptions } from '../../generators/pipeline/matrix-threads.ts';
import { regionRedistribution, regionRedistributionInput, type CaseChoice } from '../../generators/model/parts.ts';
import { regionsOf } from '../../generators/model/regions.ts';
import { detectorValidity, modelGrid } from '../../generators/pipeline/product.ts';
import type { DetectorJob } from '../../generators/pipeline/job.ts';
import { buildRedistribution, localInput, type PortableRedistributionInput, type RedistributionResult } from '../../generators/response/index.ts';
import { writeRmf } from '../../generators/ogip/index.ts';
import { KilnInputError } from '../../generators/errors.ts';
import { keptBundle, workerBundle } from '../../generators/pipeline/worker-bundle.ts';
import { JobPool } from '../../generators/pipeline/pool.ts';
import { produceJobOutput, type JobOutput } from '../../generators/pipeline/job-output.ts';
import { jobMatrixInputs } from '../../generators/pipeline/product.ts';
import { demoJobs } from '../support/demo-jobs.ts';
import { CHANNELS, META, fullSpec } from '../response/spec-fixtures.ts';

const FIXTURES = new URL('../fixtures/matrix-workers/', import.meta.url);
const sameBytes = (a: RedistributionResult, b: RedistributionResult) => Buffer.from(writeRmf(a.rmf)).equals(Buffer.from(writeRmf(b.rmf)));

/** Every component on, the table's silicon (for the failure cases). */
const UNEVEN: PortableRedistributionInput = {
  spec: fullSpec(),
  lineFits: [],
  energy: { minKeV: 0.15, maxKeV: 11, bins: 1001, spacing: 'log' },
  channels: CHANNELS,
  meta: META,
  siliconElement: 'Si',
};

/** Threaded with every row on worker threads (this thread would otherwise finish a small matrix before they start). */
async function onWorkers(input: PortableRedistributionInput, threads: number, extra: MatrixThreadOptions = {}) {
  const chunks: { i0: number; i1: number; thread: number }[] = [];
  const r = await buildRedistributionThreaded(input, { threads, minCells: 0, shareThisThread: false, onChunk: (c) => chunks.push(c), ...extra });
  return { r, chunks };
}

describe('one matrix on several threads: same bytes', () => {
  let cases: { name: string; job: DetectorJob; choice: CaseChoice; validFrom: string }[] = [];
  beforeAll(async () => {
    const jobs = await demoJobs();
    const job = (release: string, det: string) => jobs.get(release)!.find((j) => j.detector.id === det)!;
    const a = job('1.0.0', 'bi1');
    const b = job('2.1.0', 'bi1');
    cases = [
      { name: '1.0.0 bi1 (tail from line fits)', job: a, choice: { region: regionsOf(a.detector, 'detector')[0], grid: modelGrid(a), group: 1 }, validFrom: detectorValidity(a).validFrom },
      { name: '2.1.0 bi1 node (collection tail, transfer loss)', job: b, choice: { region: regionsOf(b.detector, 'node')[0], grid: modelGrid(b), group: 1 }, validFrom: detectorValidity(b).validFrom },
    ];
  });

  it('the demo cases have the line shape under test: tail, shelf, escape peak (and transfer loss in one)', () => {
    for (const c of cases) {
      const s = c.choice.region.spec;
      expect(s.tail.source === 'line-fits' || s.tail.source === 'collection' || s.tail.fractionAtZero > 0).toBe(true);
      expect(s.shelf.source === 'line-fits' || s.shelf.fraction > 0).toBe(true);
      expect(s.escape).toBe(true);
    }
    expect(regionRedistributionInput(cases[1].job, cases[1].choice, cases[1].validFrom).transferLoss).not.toBeNull();
  });

  it('demo detectors, rows on 2 and on 3 workers (800 rows: 3 does not divide them, chunks of unequal size): the RMF bytes, losses and element count of the single-thread product', async () => {
    for (const [c, workers] of [[cases[0], 2], [cases[1], 3]] as const) {
      const single = regionRedistribution(c.job, c.choice, c.validFrom);
      const progress: number[] = [];
      const { r, chunks } = await onWorkers(regionRedistributionInput(c.job, c.choice, c.validFrom), workers, { onProgress: (done) => progress.push(done) });
      expect(chunks.every((k) => k.thread >= 1), c.name).toBe(true);
      if (workers === 3) {
        expect(single.rmf.rows.length % workers).not.toBe(0);
        expect(new Set(chunks.map((k) => k.i1 - k.i0)).size).toBeGreaterThan(1);
      }
      expect(sameBytes(r, single), c.name).toBe(true);
      expect(r.losses, c.name).toEqual(single.losses);
      expect(r.nnz, c.name).toBe(single.nnz);
      expect(progress[progress.length - 1]).toBe(single.rmf.rows.length);
    }
  });

  it('this thread and a worker sharing the rows (the default; this thread surely computes some): the same bytes', async () => {
    const c = cases[1];
    const threads: number[] = [];
    const r = await buildRedistributionThreaded(regionRedistributionInput(c.job, c.choice, c.validFrom), { threads: 2, minCells: 0, onChunk: (k) => threads.push(k.thread) });
    expect(threads).toContain(0);
    expect(sameBytes(r, regionRedistribution(c.job, c.choice, c.validFrom))).toBe(true);
  });

  it('the worker as one prebuilt script (the default start) and through the TypeScript loader (the fallback): the same bytes', async () => {
    const code = await workerBundle(new URL('../../generators/pipeline/matrix-worker.ts', import.meta.url));
    expect(code).not.toBeNull();
    // Self-contained: at run time it loads Node's own modules only, none of the sources it was made from.
    const required = [...code!.matchAll(/require\("([^"]+)"\)/g)].map((m) => m[1]);
    expect(required.length).toBeGreaterThan(0);
    expect(required.every((r) => r.startsWith('node:'))).toBe(true);
    const c = cases[0];
    const input = regionRedistributionInput(c.job, c.choice, c.validFrom);
    const single = regionRedistribution(c.job, c.choice, c.validFrom);
    const loader = await onWorkers(input, 2, { workerUrl: new URL('../../generators/pipeline/matrix-worker-entry.mjs', import.meta.url) });
    expect(sameBytes(loader.r, single)).toBe(true);
  });

  it('the bundle is kept under the digest of its sources with the SHA-256 of its body; a damaged file is not used', async () => {
    const entry = new URL('../../generators/pipeline/matrix-worker.ts', import.meta.url);
    const code = await workerBundle(entry);
    const kept = keptBundle(entry);
    expect(kept.body).toBe(code);
    const text = readFileSync(kept.file, 'utf8');
    const nl = text.indexOf('\n');
    expect(text.slice(0, nl)).toBe(`// kiln worker bundle sha256:${createHash('sha256').update(text.slice(nl + 1)).digest('hex')}`);
    writeFileSync(kept.file, text.replace('parentPort', 'parentPorT'));
    try {
      expect(keptBundle(entry).body).toBeNull();
    } finally {
      writeFileSync(kept.file, text);
    }
  });

  it('a module that cannot be bundled, or reads import.meta, gives no bundle (the caller falls back to the loader entry)', async () => {
    expect(await workerBundle(new URL('no-such-module.ts', FIXTURES))).toBeNull();
    expect(await workerBundle(new URL('reads-meta-url.ts', FIXTURES))).toBeNull();
  });

  it('a small matrix stays in this thread (no worker start-up): under the threshold no worker is asked', async () => {
    const small = { ...UNEVEN, energy: { ...UNEVEN.energy, bins: 50 } };
    expect(50 * CHANNELS.count).toBeLessThan(MIN_THREADED_CELLS);
    // A worker script that does not exist: starting one would fail the build.
    const r = await buildRedistributionThreaded(small, { threads: 2, workerUrl: new URL('no-such-worker.mjs', FIXTURES) });
    expect(sameBytes(r, buildRedistribution(localInput(small)))).toBe(true);
  });
});

describe('the job pool', () => {
  it('a batch with no job to run (every job of a release from the cache) finishes at once', { timeout: 10_000 }, async () => {
    const pool = new JobPool(2);
    let called = 0;
    try {
      await pool.run([], () => called++);
    } finally {
      await pool.close();
    }
    expect(called).toBe(0);
  });
});

describe('a build of a single job', () => {
  it('spreads its matrices over the pool\'s threads (every region of a per-node release): the job output of one thread, byte for byte', async () => {
    const job = (await demoJobs()).get('2.1.0')!.find((j) => j.detector.id === 'bi1')!;
    // The whole detector and each node (the demo's 2.1.0 ships per-node products).
    expect(jobMatrixInputs(job).length).toBeGreaterThan(1);
    const pool = new JobPool(2, { matrixMinCells: 0 });
    let got: JobOutput | null = null;
    try {
      await pool.run([{ job, fingerprint: 'f', generator: 'g' }], (r) => (got = r));
    } finally {
      await pool.close();
    }
    const single = produceJobOutput(job, 'f', 'g');
    expect(got!.meta).toEqual(single.meta);
    expect(got!.gz.map((b) => Buffer.from(b).toString('hex'))).toEqual(single.gz.map((b) => Buffer.from(b).toString('hex')));
  });
});

describe('rowChunks', () => {
  it('contiguous, in order, covering every row once, sizes differing by at most one', () => {
    for (const [nE, n] of [[1001, 48], [8192, 32], [5, 32], [1, 4]]) {
      const c = rowChunks(nE, n);
      expect(c[0][0]).toBe(0);
      expect(c[c.length - 1][1]).toBe(nE);
      c.slice(1).forEach((k, i) => expect(k[0]).toBe(c[i][1]));
      const sizes = c.map(([a, b]) => b - a);
      expect(Math.min(...sizes)).toBeGreaterThanOrEqual(1);
      expect(Math.max(...sizes) - Math.min(...sizes)).toBeLessThanOrEqual(1);
    }
  });
});

describe('one matrix on several threads: failures', () => {
  const failing = (script: string, extra: MatrixThreadOptions = {}) =>
    buildRedistributionThreaded(UNEVEN, { threads: 2, minCells: 0, shareThisThread: false, workerUrl: new URL(script, FIXTURES), ...extra });

  for (const [script, message] of [
    ['replies-error.mjs', /matrix worker failed: planted failure in a row/],
    ['throws.mjs', /matrix worker failed: planted crash in a worker/],
    ['exits.mjs', /matrix worker stopped \(exit code 3\) before returning rows \d+–\d+/],
    ['bad-rows.mjs', /packed rows do not add up/],
  ] as const)
    it(`a worker that fails (${script}) rejects the build with a clear error, and no matrix`, async () => {
      let chunksPlaced = 0;
      try {
        await failing(script, { onChunk: () => chunksPlaced++ });
        expect.unreachable();
      } catch (e) {
        expect((e as Error).message).toMatch(message);
      }
      expect(chunksPlaced).toBe(0);
    });

  it('a worker that fails while this thread shares the rows still fails the build', async () => {
    // This thread's rows take far longer than the stand-in's start-up, so the stand-in is sent rows.
    const big = { ...UNEVEN, energy: { ...UNEVEN.energy, bins: 8000 } };
    await expect(buildRedistributionThreaded(big, { threads: 2, minCells: 0, workerUrl: new URL('replies-error.mjs', FIXTURES) })).rejects.toThrow(/planted failure in a row/);
  });

  it('an input error reported by a worker stays an input error (file, field, value, expected)', async () => {
    try {
      await failing('replies-input-error.mjs');
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(KilnInputError);
      expect((e as KilnInputError).oneLine()).toBe('fwhm.fano: bad redistribution parameter fwhm.fano (got -1; expected > 0)');
    }
  });

  it('a bad input fails in this thread before any worker starts', async () => {
    // The worker script does not exist: had a worker started first, the error would name it.
    const bad = { ...UNEVEN, cut: 2 };
    await expect(buildRedistributionThreaded(bad, { threads: 2, minCells: 0, workerUrl: new URL('no-such-worker.mjs', FIXTURES) })).rejects.toMatchObject({ name: 'KilnInputError', where: { field: 'cut', value: 2 } });
  });

  it('an input that cannot be sent to a thread is refused with a clear error', async () => {
    const withFunction = { ...UNEVEN, meta: { ...META, extraKeywords: [{ keyword: 'X', value: (() => 1) as unknown as number }] } };
    await expect(buildRedistributionThreaded(withFunction, { threads: 2, minCells: 0 })).rejects.toThrow(/matrix input cannot be sent to a worker thread/);
  });

  it('a bad thread count is refused', async () => {
    for (const threads of [0, 1.5, -1, 1e6]) await expect(buildRedistributionThreaded(UNEVEN, { threads })).rejects.toMatchObject({ name: 'KilnInputError', where: { field: 'threads' } });
  });
});

describe('no nested parallelism', () => {
  it('inside a worker thread (a job of the build pool) a matrix uses that thread alone', async () => {
    const w = new Worker(new URL('nested.mjs', FIXTURES));
    const got = await new Promise((resolve, reject) => {
      w.once('message', resolve);
      w.once('error', reject);
    });
    await w.terminate();
    expect(got).toEqual([1, 1]);
  });
});
