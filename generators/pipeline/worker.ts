/** Worker-thread side of the job pool: runs detector jobs sent by the main thread. */
import { parentPort } from 'node:worker_threads';
import { isInputError } from '../errors.ts';
import { produceJobOutput } from './job-output.ts';
import type { JobTask } from './pool.ts';

if (!parentPort) throw new Error('generators/pipeline/worker.ts must run in a worker thread');
const port = parentPort;

port.on('message', (msg: { seq: number; task: JobTask }) => {
  try {
    const { job, fingerprint, generator } = msg.task;
    const result = produceJobOutput(job, fingerprint, generator);
    port.postMessage({ seq: msg.seq, ok: true, result }, result.gz.map((b) => b.buffer as ArrayBuffer));
  } catch (e) {
    const input = isInputError(e);
    port.postMessage({
      seq: msg.seq,
      ok: false,
      input,
      message: e instanceof Error ? e.message : String(e),
      where: input ? e.where : undefined,
      stack: e instanceof Error ? e.stack : undefined,
    });
  }
});
