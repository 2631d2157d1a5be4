/**
 * Runs detector jobs in parallel on worker threads (one per core at most). The pool is kept
 * across batches so a build pays the thread start-up once. With one worker, jobs run in this
 * thread: no spawn cost, and stack traces stay simple.
 */
import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import { KilnInputError } from '../errors.ts';
import type { DetectorJob } from './job.ts';
import { runDetectorJob, type DetectorJobResult } from './run-job.ts';

type Reply =
  | { seq: number; ok: true; result: DetectorJobResult }
  | { seq: number; ok: false; input: boolean; message: string; where?: KilnInputError['where']; stack?: string };

export function defaultWorkerCount(): number {
  return Math.max(1, availableParallelism());
}

export class JobPool {
  private readonly size: number;
  private workers: Worker[] = [];

  constructor(size = defaultWorkerCount()) {
    this.size = Math.max(1, Math.floor(size));
  }

  /** Results in the order of `jobs`; onDone is called as each finishes. */
  async run(jobs: DetectorJob[], onDone?: (r: DetectorJobResult) => void): Promise<DetectorJobResult[]> {
    const results: DetectorJobResult[] = new Array(jobs.length);
    if (this.size === 1 || jobs.length <= 1) {
      for (let i = 0; i < jobs.length; i++) {
        results[i] = runDetectorJob(jobs[i]);
        onDone?.(results[i]);
      }
      return results;
    }
    const want = Math.min(this.size, jobs.length);
    while (this.workers.length < want) this.workers.push(new Worker(new URL('./worker-entry.mjs', import.meta.url)));
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
        w.postMessage({ seq, job: jobs[seq] });
      };
      for (const w of active) {
        w.on('message', (m: Reply) => {
          if (!m.ok) {
            fail(m.input ? new KilnInputError(m.message, m.where) : Object.assign(new Error(m.message), { stack: m.stack }));
            return;
          }
          results[m.seq] = m.result;
          onDone?.(m.result);
          if (++done === jobs.length) {
            cleanup();
            resolve();
          } else feed(w);
        });
        w.on('error', fail);
        feed(w);
      }
    });
    return results;
  }

  async close(): Promise<void> {
    const ws = this.workers;
    this.workers = [];
    await Promise.all(ws.map((w) => w.terminate()));
  }
}
