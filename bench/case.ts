/**
 * One benchmark case in its own process, so that its peak RSS is its own:
 *   node --import tsx bench/case.ts <case> <tmpDir>
 * Prints one JSON line (a CaseResult). Timing starts after the inputs are loaded and covers the
 * model, the FITS bytes, the durable write and the validation of the written bytes.
 */
import { join, resolve } from 'node:path';
import { buildRedistribution, energyGrid, type RedistributionResult } from '../generators/response/index.ts';
import { writeArf, writeRmf } from '../generators/ogip/index.ts';
import { checkFile } from '../generators/checks/index.ts';
import { binCentresKeV, efficiencyBreakdown, escapeInputsFor, mirrorAreaAtBinCentres } from '../generators/physics/index.ts';
import { loadContent } from '../generators/content/index.ts';
import { ARF_CASE, BENCH_META, BENCH_SPEC, RMF_CASES, channelGridOf, energyGridOf } from './cases.ts';
import { writeFileSynced } from './io.ts';
import { Clock, type CaseResult } from './measure.ts';

/** Demo content whose newest release gives the ARF case its mirror and detector stack (invented, see content/README.md). */
const DEMO_CONTENT = 'content';

function checkCounts(checks: { status: string }[]): Record<string, number> {
  const out: Record<string, number> = {};
  for (const c of checks) out[c.status] = (out[c.status] ?? 0) + 1;
  return out;
}

async function runRmf(name: string, tmpDir: string): Promise<CaseResult> {
  const c = RMF_CASES.find((x) => x.name === name)!;
  const silicon = escapeInputsFor('Si');
  const path = join(tmpDir, `${name}.fits`);
  const clock = new Clock();
  let r: RedistributionResult | null = buildRedistribution({ spec: BENCH_SPEC, lineFits: [], energy: energyGridOf(c.energies), channels: channelGridOf(c.channels), meta: BENCH_META, silicon });
  clock.lap('modelS');
  const bytes = writeRmf(r.rmf);
  const nnz = r.nnz;
  // The in-memory matrix is not needed once its bytes exist: let it go before validation, as a
  // build that streams products would.
  r = null;
  clock.lap('fitsBytesS');
  writeFileSynced(path, bytes);
  clock.lap('writeS');
  const checked = checkFile(bytes, `${name}.fits`);
  clock.lap('checkS');
  return clock.result(name, { bytesWritten: bytes.length, nnz, files: [path], checks: checkCounts(checked.checks) });
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
  const checked = checkFile(bytes, `${ARF_CASE.name}.fits`);
  clock.lap('checkS');
  // An ARF has one stored value per energy bin: count those as its "non-zero elements".
  return clock.result(ARF_CASE.name, { bytesWritten: bytes.length, nnz: bins.loKeV.length, files: [path], checks: checkCounts(checked.checks) });
}

const [name, tmpDir] = process.argv.slice(2);
if (!name || !tmpDir) {
  console.error('usage: node --import tsx bench/case.ts <case> <tmpDir>');
  process.exit(2);
}
const result = name === ARF_CASE.name ? await runArf(tmpDir) : RMF_CASES.some((c) => c.name === name) ? await runRmf(name, tmpDir) : null;
if (!result) {
  console.error(`bench/case.ts: unknown case "${name}"`);
  process.exit(2);
}
process.stdout.write(JSON.stringify(result) + '\n');
