/**
 * One redistribution matrix on every core (Node only): the energy rows are cut into contiguous
 * chunks, handed out one at a time to this thread and to worker threads as each becomes free,
 * and put back in row order. Every row depends on its own energy bin only
 * (response/redistribution.ts `redistributionRows`), so the matrix, and its FITS bytes, are those
 * of the single-thread build whatever the split.
 *
 * This thread computes chunks too while the workers start, so a worker that is slow to start
 * costs little; handing out small chunks on demand also evens out rows of unequal cost and a
 * core shared with other work.
 *
 * No nested parallelism: the build's job pool (pipeline/pool.ts) already runs one job per core,
 * so called from a worker thread this runs in that thread alone.
 */
import { availableParallelism } from 'node:os';
import { isMainThread, Worker } from 'node:worker_threads';
import { KilnInputError } from '../errors.ts';
import {
  assembleRedistribution,
  localInput,
  prepareRedistribution,
  redistributionRows,
  unpackRows,
  type PackedRows,
  type PortableRedistributionInput,
  type RedistributionResult,
  type RowBlock,
} from '../response/index.ts';
import { workerBundle } from './worker-bundle.ts';

export interface MatrixThreadOptions {
  /** Threads in all, this one included (default: the cores available); 1 = this thread only. */
  threads?: number;
  /** Matrices of fewer cells (energies × channels) are built in this thread alone (default MIN_THREADED_CELLS). */
  minCells?: number;
  /** Whether this thread computes chunks too (default true); false: `threads` workers compute every row and this thread assembles them. */
  shareThisThread?: boolean;
  /** (rows done, rows) after each chunk. */
  onProgress?: (done: number, total: number) => void;
  /** Each chunk as it is put in place, with the thread that computed it (0 = this one, 1… the workers). */
  onChunk?: (chunk: { i0: number; i1: number; thread: number }) => void;
  /** The worker script, started as it is (tests give one that fails); default: the matrix worker, prebuilt into one script (pipeline/worker-bundle.ts). */
  workerUrl?: URL;
}

/**
 * Below this many cells a matrix is built in this thread alone. Measured 2026-12-03 on the
 * project's 2-core machine (shared): a worker needs 0.4–1.8 s from spawn to its first row
 * (thread, TypeScript loader, modules, preparing), and rows cost about 75 ns per cell (the
 * 4096 × 8192 bench case: 2.6 s of rows in one thread). Under 4 M cells (≈ 0.3 s of rows, e.g.
 * 1024 channels × 4096 energies) this thread is done before a worker could take a row, and
 * the start-up would only burn the other core.
 */
export const MIN_THREADED_CELLS = 4 * 1024 * 1024;
/** Most threads one matrix asks for (a guard against a typo spawning thousands). */
const MAX_THREADS = 256;
/** The worker's module, and its entry through the TypeScript loader (used when it cannot be prebuilt). */
const WORKER_MODULE = new URL('./matrix-worker.ts', import.meta.url);
const WORKER_LOADER_ENTRY = new URL('./matrix-worker-entry.mjs', import.meta.url);
/** Rows this thread computes between two looks at the events while no worker is ready yet (a few ms of rows). */
const STARTUP_SLICE_ROWS = 16;
/** Chunks per thread: small enough that the last chunk ends close to the others, large enough that handing out costs nothing. */
const CHUNKS_PER_THREAD = 16;

/** What a worker says: ready after preparing, then one reply per chunk. */
export type MatrixWorkerReply =
  | { kind: 'ready' }
  | { kind: 'rows'; seq: number; packed: PackedRows }
  | { kind: 'error'; input: boolean; message: string; where?: KilnInputError['where']; stack?: string };

/** Threads to use: the request, else the cores available; 1 in a worker thread (its pool already fills the cores). */
export function matrixThreads(requested?: number): number {
  if (requested !== undefined && !(Number.isInteger(requested) && requested >= 1 && requested <= MAX_THREADS))
    throw new KilnInputError('bad thread count', { field: 'threads', value: requested, expected: `a whole number from 1 to ${MAX_THREADS}` });
  if (!isMainThread) return 1;
  return requested ?? Math.max(1, availableParallelism());
}

/** Contiguous chunks [i0, i1) covering rows 0…nE−1 in order. */
export function rowChunks(nE: number, chunks: number): [number, number][] {
  const n = Math.max(1, Math.min(nE, chunks));
  return Array.from({ length: n }, (_, c) => [Math.floor((c * nE) / n), Math.floor(((c + 1) * nE) / n)] as [number, number]);
}

const yieldToEvents = () => new Promise<void>((resolve) => setImmediate(resolve));

function errorOf(m: Extract<MatrixWorkerReply, { kind: 'error' }>): Error {
  return m.input ? new KilnInputError(m.message, m.where) : Object.assign(new Error(`matrix worker failed: ${m.message}`), { stack: m.stack });
}

/**
 * The matrix of `input`, its rows spread over threads. Checks the input in this thread first (a
 * bad input fails before any thread starts); a failure in any thread rejects the whole build,
 * stops every worker and returns nothing.
 */
export async function buildRedistributionThreaded(input: PortableRedistributionInput, options: MatrixThreadOptions = {}): Promise<RedistributionResult> {
  const p = prepareRedistribution(localInput(input));
  const nE = p.bins.loKeV.length;
  const threads = matrixThreads(options.threads);
  const onProgress = options.onProgress;
  if (threads === 1 || nE * p.channels.count < (options.minCells ?? MIN_THREADED_CELLS) || nE < 2)
    return assembleRedistribution(p, [redistributionRows(p, 0, nE, onProgress)]);

  const chunks = rowChunks(nE, threads * CHUNKS_PER_THREAD);
  const blocks: (RowBlock[] | undefined)[] = new Array(chunks.length);
  let next = 0;
  let rowsDone = 0;
  let failure: Error | null = null;
  let wake: (() => void) | null = null;
  const settle = () => wake?.();
  let workersReady = 0;
  const finished = (seq: number, parts: RowBlock[], thread: number) => {
    blocks[seq] = parts;
    rowsDone += parts.reduce((n, b) => n + b.rows.length, 0);
    options.onChunk?.({ i0: chunks[seq][0], i1: chunks[seq][1], thread });
    onProgress?.(rowsDone, nE);
  };
  const fail = (e: Error) => {
    failure ??= e;
    settle();
  };

  const shareThisThread = options.shareThisThread ?? true;
  const workers: Worker[] = [];
  let alive = 0;
  const busy = new Map<Worker, number>();
  const feed = (w: Worker) => {
    if (failure || next >= chunks.length) return;
    const seq = next++;
    busy.set(w, seq);
    w.postMessage({ seq, i0: chunks[seq][0], i1: chunks[seq][1] });
  };
  let closed = false;
  const start = (thread: number, source: URL | string) => {
    let w: Worker;
    try {
      w = typeof source === 'string' ? new Worker(source, { eval: true, workerData: { input } }) : new Worker(source, { workerData: { input } });
    } catch (e) {
      // A value that cannot be cloned to another thread (a function, say) fails here.
      throw Object.assign(new Error(`matrix input cannot be sent to a worker thread: ${(e as Error).message}`), { cause: e });
    }
    w.on('message', (m: MatrixWorkerReply) => {
      if (m.kind === 'ready') {
        workersReady++;
        return feed(w);
      }
      if (m.kind === 'error') return fail(errorOf(m));
      busy.delete(w);
      try {
        finished(m.seq, [unpackRows(m.packed)], thread);
      } catch (e) {
        return fail(e as Error);
      }
      feed(w);
      settle();
    });
    w.on('error', (e) => fail(Object.assign(new Error(`matrix worker failed: ${e.message}`), { stack: e.stack })));
    w.on('exit', (code) => {
      // Listened to until the matrix is done: any stop before that is a failure, except a clean
      // exit of an idle worker while others (or this thread) can still do the rows.
      const seq = busy.get(w);
      alive--;
      if (seq !== undefined) fail(new Error(`matrix worker stopped (exit code ${code}) before returning rows ${chunks[seq][0]}–${chunks[seq][1]}`));
      else if (code !== 0) fail(new Error(`matrix worker stopped (exit code ${code})`));
      else if (alive === 0 && !shareThisThread) fail(new Error('every matrix worker stopped before the matrix was done'));
    });
    workers.push(w);
    alive++;
  };

  try {
    const startAll = (source: URL | string) => {
      // Too late (done or failed) or nothing left for a worker: start none.
      if (closed || failure || next >= chunks.length) return;
      try {
        for (let t = 1; t < (shareThisThread ? threads : threads + 1); t++) start(t, source);
      } catch (e) {
        fail(e as Error);
      }
    };
    if (options.workerUrl) startAll(options.workerUrl);
    // The bundle is made in esbuild's process while this thread computes its first chunks.
    else void workerBundle(WORKER_MODULE).then((code) => startAll(code ?? WORKER_LOADER_ENTRY));
    // This thread takes the next chunk whenever it is free, and lets the workers' messages in between.
    while (shareThisThread && !failure && next < chunks.length) {
      const seq = next++;
      const [i0, i1] = chunks[seq];
      // Until a worker is ready, rows in short slices with the events let in between: the
      // workers' start-up (the bundle made in esbuild's process, the thread's messages) moves on
      // at each turn, not once per chunk.
      const slice = workersReady > 0 ? i1 - i0 : STARTUP_SLICE_ROWS;
      const parts: RowBlock[] = [];
      for (let a = i0; a < i1; a += slice) {
        parts.push(redistributionRows(p, a, Math.min(i1, a + slice)));
        if (a + slice < i1) await yieldToEvents();
      }
      finished(seq, parts, 0);
      await yieldToEvents();
    }
    while (!failure && rowsDone < nE) await new Promise<void>((resolve) => (wake = resolve));
  } finally {
    closed = true;
    // Not awaited: a worker still starting can take a few hundred ms to stop, and nothing it does
    // now reaches the result (its 'error' listener stays, so a late error is not uncaught).
    for (const w of workers) {
      w.removeAllListeners('exit');
      w.unref();
      void w.terminate();
    }
  }
  if (failure) throw failure;
  return assembleRedistribution(p, (blocks as RowBlock[][]).flat());
}
