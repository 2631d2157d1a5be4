/**
 * The floor of a case, in its own process: the least any writer of the same bytes must do — the
 * FITS ones'-complement sum (generators/fits/checksum.ts) and a SHA-256 over the bytes, and a
 * durable write of them (fsync).
 *   node --import tsx bench/floor.ts <case> <out> <file>... | @<list file, one path a line>
 * Reading the case's files back is not timed. Prints one JSON line.
 */
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { onesComplementSum } from '../generators/fits/checksum.ts';
import { concatPadded, writeFileSynced } from './io.ts';
import { Clock } from './measure.ts';

const [name, out, ...args] = process.argv.slice(2);
const files = args.flatMap((a) => (a.startsWith('@') ? readFileSync(a.slice(1), 'utf8').split('\n').filter(Boolean) : [a]));
if (!name || !out || files.length === 0) {
  console.error('usage: node --import tsx bench/floor.ts <case> <out> <file>...');
  process.exit(2);
}
const bytes = concatPadded(files);
const clock = new Clock();
const sum = onesComplementSum(bytes);
clock.lap('checksumS');
const sha = createHash('sha256').update(bytes).digest('hex');
clock.lap('sha256S');
writeFileSynced(out, bytes);
clock.lap('writeS');
const r = clock.result(name, { bytesWritten: bytes.length, nnz: 0, files: [out], sum, sha256: sha });
process.stdout.write(JSON.stringify({ case: r.case, floorS: r.wallS, floorCpuS: r.cpuS, phases: r.phases, bytes: r.bytesWritten }) + '\n');
