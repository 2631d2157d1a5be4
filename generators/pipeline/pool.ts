/**
 * Runs detector jobs in parallel on worker threads (one per core at most). The pool is kept
 * across batches so a build pays the thread start-up once, and a worker starts from one prebuilt
 * script of its modules. With one worker, jobs run in this thread: no spawn cost, and stack traces
 * stay simple.
 */
import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import { KilnInputError } from '../errors.ts';
import type { DetectorJob } from './job.ts';
import { produceJobOutput, type JobOutput } from './job-output.ts';
import { workerBundle } from './worker-bundle.ts';
import { buildRedistributionThreaded } from './matrix-threads.ts';
import { jobMatrixInputs } from './product.ts';
import type { RedistributionResult } from '../response/index.ts';

/** The worker's module, and its entry through the TypeScript loader (used when it cannot be prebuilt). */
const WORKER_MODULE = new URL('./worker.ts', import.meta.url);
const WORKER_LOADER_ENTRY = new URL('./worker-entry.mjs', import.meta.url);

/** A job with its fingerprint and the generator version recorded in its output. */
export interface JobTask {
  job: DetectorJob;
  fingerprint: string;
  generator: string;
}

type Reply =
  | { seq: number; ok: true; result: JobOutput }
  | { seq: number; ok: false; input: boolean; message: string; where?: KilnInputError['where']; stack?: string };

export function defaultWorkerCount(): number {
  return Math.max(1, availableParallelism());
}

export class JobPool {
  private readonly size: number;
  private workers: Worker[] = [];

  /** Matrices of fewer cells stay in one thread when a batch has a single job (default: matrix-threads.ts MIN_THREADED_CELLS). */
  private readonly matrixMinCells?: number;

  constructor(size = defaultWorkerCount(), options: { matrixMinCells?: number } = {}) {
    this.size = Math.max(1, Math.floor(size));
    this.matrixMinCells = options.matrixMinCells;
  }

  /**
   * Runs every task; onDone gets each output with its index in `jobs` as it finishes (in any
   * order). Outputs are not kept here: the caller writes each to disk and keeps its summary, so
   * memory does not grow with the number of jobs.
   */
  async run(jobs: JobTask[], onDone: (r: JobOutput, index: number) => void): Promise<void> {
    if (jobs.length === 0) return;
    if (this.size === 1) {
      for (let i = 0; i < jobs.length; i++) onDone(produceJobOutput(jobs[i].job, jobs[i].fingerprint, jobs[i].generator), i);
      return;
    }
    if (jobs.length === 1) {
      // One job and several cores: its large matrices are spread over the cores instead
      // (pipeline/matrix-threads.ts; the same bytes), the rest of the job runs here.
      const { job, fingerprint, generator } = jobs[0];
      const matrices = new Map<string, RedistributionResult>();
      for (const { label, input } of jobMatrixInputs(job)) matrices.set(label, await buildRedistributionThreaded(input, { threads: this.size, minCells: this.matrixMinCells }));
      onDone(produceJobOutput(job, fingerprint, generator, matrices), 0);
      return;
    }
    const want = Math.min(this.size, jobs.length);
    if (this.workers.length < want) {
      // One prebuilt script starts a worker in a fraction of the loader's time (pipeline/worker-bundle.ts).
      const code = await workerBundle(WORKER_MODULE);
      while (this.workers.length < want) this.workers.push(code ? new Worker(code, { eval: true }) : new Worker(WORKER_LOADER_ENTRY));
    }
    const active = this.workers.slice(0, want);
    let next = 0;
    let done = 0;
    await new Promise<void>((resolve, reject) => {
      let failed = false;
      const cleanup = () => {
        for (const w of active) {
          w.removeAllListeners('message');
          w.removeAllListeners('error');
        }
      };
      const fail = (e: Error) => {
        if (failed) return;
        failed = true;
        cleanup();
        reject(e);
      };
      const feed = (w: Worker) => {
        if (failed || next >= jobs.length) return;
        const seq = next++;
        w.postMessage({ seq, task: jobs[seq] });
      };
      for (const w of active) {
        w.on('message', (m: Reply) => {
          if (!m.ok) {
            fail(m.input ? new KilnInputError(m.message, m.where) : Object.assign(new Error(m.message), { stack: m.stack }));
            return;
          }
          try {
            onDone(m.result, m.seq);
          } catch (e) {
            fail(e as Error);
            return;
          }
          if (++done === jobs.length) {
            cleanup();
            resolve();
          } else feed(w);
        });
        w.on('error', fail);
        feed(w);
      }
    });
  }

  async close(): Promise<void> {
    const ws = this.workers;
    this.workers = [];
    await Promise.all(ws.map((w) => w.terminate()));
  }
}
