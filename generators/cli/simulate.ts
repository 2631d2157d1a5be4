/**
 * kiln simulate: seeded Poisson draws of a source folded through a response, written atomically
 * as an OGIP PHA (SPECTRUM) file naming the response files in RESPFILE and ANCRFILE. Same inputs
 * and seed, same bytes.
 */
import { isIsoDate } from '../content/schema.ts';
import { writeFileAtomic } from '../node/index.ts';
import { writePha } from '../ogip/index.ts';
import { binnedPhotonFlux, foldCounts, simulateSpectrum, sum } from '../spectrum/index.ts';
import { optFlag, optString, UsageError, type CommandSpec, type ParsedArgs } from './args.ts';
import { checkSourceFits, fileName, gridFor, loadResponse, loadSource, positiveOption, RESPONSE_OPTIONS, responsePaths } from './spectral-inputs.ts';

const MAX_SEED = 0xffffffff;

export async function runSimulate(args: ParsedArgs, write: (s: string) => void = (s) => process.stdout.write(s)): Promise<number> {
  const sourcePath = optString(args, 'source');
  const out = optString(args, 'out');
  if (!sourcePath) throw new UsageError('--source FILE is required');
  if (!out) throw new UsageError('--out FILE is required (the PHA file to write)');
  const paths = responsePaths(args);
  const seedText = optString(args, 'seed');
  if (seedText !== undefined && !(/^\d+$/.test(seedText) && Number(seedText) <= MAX_SEED)) throw new UsageError(`--seed: "${seedText}" is not an integer 0..${MAX_SEED}`);
  const date = optString(args, 'date');
  if (date !== undefined && !isIsoDate(date)) throw new UsageError(`--date: "${date}" is not a calendar date YYYY-MM-DD`);
  const source = await loadSource(sourcePath);
  const r = loadResponse(paths.rmf, paths.arf);
  await checkSourceFits(source, r.response);
  const exposureS = positiveOption(args, 'exposure') ?? source.doc.exposureS;
  const seed = seedText !== undefined ? Number(seedText) : source.doc.seed;
  const expected = foldCounts(r.response, binnedPhotonFlux(gridFor(r, source), source.model), exposureS);
  const sim = simulateSpectrum(r.response, {
    expected,
    exposureS,
    seed,
    respfile: fileName(r.rmfPath),
    ancrfile: fileName(r.arfPath),
    date: date ?? r.date,
    history: [`simulated spectrum of source ${source.doc.id}, seed ${seed}, exposure ${exposureS} s`],
  });
  writeFileAtomic(out, writePha(sim.pha));
  const total = sum(sim.counts);
  if (optFlag(args, 'json')) write(JSON.stringify({ out, source: source.doc.id, seed, exposureS, counts: total, expectedCounts: sum(expected) }) + '\n');
  else write(`wrote ${out}: ${total} counts in ${r.response.detchans} channels (expected ${sum(expected).toPrecision(6)}), seed ${seed}, exposure ${exposureS} s\n`);
  return 0;
}

export const command: CommandSpec = {
  name: 'simulate',
  summary: 'Simulate the spectrum of a source through a response (seeded Poisson draws) and write it as an OGIP PHA file',
  usage: 'kiln simulate --source FILE --rmf FILE [--arf FILE] --out FILE [--exposure S] [--seed N] [--date YYYY-MM-DD] [--json]',
  options: [
    { name: 'source', arg: 'FILE', help: 'source description (YAML)' },
    ...RESPONSE_OPTIONS,
    { name: 'out', arg: 'FILE', help: 'PHA file to write (replaced atomically)' },
    { name: 'exposure', arg: 'S', help: "exposure in seconds (default: the source's exposureS)" },
    { name: 'seed', arg: 'N', help: "random seed (default: the source's seed)" },
    { name: 'date', arg: 'YYYY-MM-DD', help: "DATE written into the file (default: the RMF's DATE)" },
    { name: 'json', help: 'print a JSON summary' },
  ],
  positionals: { min: 0, max: 0, names: '' },
  run: (args) => runSimulate(args),
};
