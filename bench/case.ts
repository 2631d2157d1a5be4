/**
 * One benchmark case in its own process, so that its peak RSS is its own:
 *   node --import tsx bench/case.ts <case> <tmpDir> [<threads>]
 *   node --import tsx bench/case.ts check-<case> <tmpDir>
 * Prints one JSON line (a CaseResult). A product case is timed from after its inputs are loaded
 * over the model, the FITS bytes and the durable write; the check case reads the written file
 * and runs every per-product check on it (what `kiln check` does). An RMF is built on every core
 * (pipeline/matrix-threads.ts; worker start-up is timed) unless <threads> says otherwise.
 */
import { join, resolve } from 'node:path';
import { energyGrid, type RedistributionResult } from '../generators/response/index.ts';
import { buildRedistributionThreaded, matrixThreads } from '../generators/pipeline/matrix-threads.ts';
import { writeArf, writeRmf } from '../generators/ogip/index.ts';
import { checkFile } from '../generators/checks/index.ts';
import { binCentresKeV, efficiencyBreakdown, mirrorAreaAtBinCentres } from '../generators/physics/index.ts';
import { loadContent } from '../generators/content/index.ts';
import { readFileSync } from 'node:fs';
import { ARF_CASE, BENCH_META, BENCH_SPEC, CHECK_PREFIX, RMF_CASES, channelGridOf, checkCaseOf, energyGridOf } from './cases.ts';
import { writeFileSynced } from './io.ts';
import { Clock, type CaseResult } from './measure.ts';

/** Demo content whose newest release gives the ARF case its mirror and detector stack (invented, see content/README.md). */
const DEMO_CONTENT = 'content';

function checkCounts(checks: { status: string }[]): Record<string, number> {
  const out: Record<string, number> = {};
  for (const c of checks) out[c.status] = (out[c.status] ?? 0) + 1;
  return out;
}

async function runRmf(name: string, tmpDir: string, threads: number | undefined): Promise<CaseResult> {
  const c = RMF_CASES.find((x) => x.name === name)!;
  const path = join(tmpDir, `${name}.fits`);
  const clock = new Clock();
  const input = { spec: BENCH_SPEC, lineFits: [], energy: energyGridOf(c.energies), channels: channelGridOf(c.channels), meta: BENCH_META, siliconElement: 'Si' };
  let r: RedistributionResult | null = await buildRedistributionThreaded(input, { threads });
  clock.lap('modelS');
  const bytes = writeRmf(r.rmf);
  const nnz = r.nnz;
  // The in-memory matrix is not needed once its bytes exist: let it go before validation, as a
  // build that streams products would.
  r = null;
  clock.lap('fitsBytesS');
  writeFileSynced(path, bytes);
  clock.lap('writeS');
  return clock.result(name, { bytesWritten: bytes.length, nnz, files: [path], threads: matrixThreads(threads) });
}

/** Reads a product written by its case and validates it. */
function runCheck(productCase: string, tmpDir: string): CaseResult {
  const path = join(tmpDir, `${productCase}.fits`);
  const clock = new Clock();
  const buf = readFileSync(path);
  // A view of the file's buffer, as generators/node/fits-file.ts reads it (no second copy).
  const bytes = new Uint8Array(buf.buffer, buf.byteOffset, buf.byteLength);
  clock.lap('readS');
  const checked = checkFile(bytes, `${productCase}.fits`);
  clock.lap('checkS');
  const counts = checkCounts(checked.checks);
  if (counts.fail) throw new Error(`${productCase}: ${counts.fail} checks failed`);
  return clock.result(checkCaseOf(productCase), { bytesWritten: 0, bytesRead: bytes.length, nnz: 0, files: [path], checks: counts });
}

async function runArf(tmpDir: string): Promise<CaseResult> {
  const tree = await loadContent(resolve(DEMO_CONTENT));
  const release = tree.releases[tree.releases.length - 1];
  const { instrument } = release;
  const detector = release.detectors[0];
  const path = join(tmpDir, `${ARF_CASE.name}.fits`);
  const clock = new Clock();
  const bins = energyGrid(energyGridOf(ARF_CASE.energies));
  const centres = binCentresKeV(bins.loKeV, bins.hiKeV);
  const mirrorCm2 = mirrorAreaAtBinCentres(instrument.mirror, bins.loKeV, bins.hiKeV);
  const eff = efficiencyBreakdown(detector.stack, centres, detector.epochs[0]?.date ?? null);
  const specrespCm2 = mirrorCm2.map((a, i) => a * eff.detectorQE[i]);
  clock.lap('modelS');
  const bytes = writeArf({ meta: BENCH_META, energLoKeV: bins.loKeV, energHiKeV: bins.hiKeV, specrespCm2 });
  clock.lap('fitsBytesS');
  writeFileSynced(path, bytes);
  clock.lap('writeS');
  // An ARF has one stored value per energy bin: count those as its "non-zero elements".
  return clock.result(ARF_CASE.name, { bytesWritten: bytes.length, nnz: bins.loKeV.length, files: [path] });
}

const [name, tmpDir, threadsText] = process.argv.slice(2);
const threads = threadsText === undefined ? undefined : Number(threadsText);
if (!name || !tmpDir || (threads !== undefined && !(Number.isInteger(threads) && threads >= 1))) {
  console.error('usage: node --import tsx bench/case.ts <case> <tmpDir> [<threads>]');
  process.exit(2);
}
const product = name.startsWith(CHECK_PREFIX) ? name.slice(CHECK_PREFIX.length) : null;
const result =
  product !== null && (product === ARF_CASE.name || RMF_CASES.some((c) => c.name === product))
    ? runCheck(product, tmpDir)
    : name === ARF_CASE.name
      ? await runArf(tmpDir)
      : RMF_CASES.some((c) => c.name === name)
        ? await runRmf(name, tmpDir, threads)
        : null;
if (!result) {
  console.error(`bench/case.ts: unknown case "${name}"`);
  process.exit(2);
}
process.stdout.write(JSON.stringify(result) + '\n');
