/** Worker-thread side of pipeline/matrix-threads.ts: prepares the matrix once, then computes the row chunks it is sent. */
import { parentPort, workerData } from 'node:worker_threads';
import { isInputError } from '../errors.ts';
import { prepareRedistribution, redistributionRows, type PreparedRedistribution } from '../response/redistribution.ts';
import { packedBuffers, packRows } from '../response/row-block.ts';
import { localInput, type PortableRedistributionInput } from '../response/portable-input.ts';
import type { MatrixWorkerReply } from './matrix-threads.ts';

if (!parentPort) throw new Error('generators/pipeline/matrix-worker.ts must run in a worker thread');
const port = parentPort;

function reply(m: MatrixWorkerReply, transfer: ArrayBuffer[] = []): void {
  port.postMessage(m, transfer);
}

function replyError(e: unknown): void {
  const input = isInputError(e);
  reply({ kind: 'error', input, message: e instanceof Error ? e.message : String(e), where: input ? e.where : undefined, stack: e instanceof Error ? e.stack : undefined });
}

let prepared: PreparedRedistribution | null = null;
try {
  prepared = prepareRedistribution(localInput((workerData as { input: PortableRedistributionInput }).input));
  reply({ kind: 'ready' });
} catch (e) {
  replyError(e);
}

port.on('message', (msg: { seq: number; i0: number; i1: number }) => {
  if (!prepared) return;
  try {
    const packed = packRows(redistributionRows(prepared, msg.i0, msg.i1));
    reply({ kind: 'rows', seq: msg.seq, packed }, packedBuffers(packed));
  } catch (e) {
    replyError(e);
  }
});
