/**
 * kiln response: the RMF and ARF (and on request the RSP) of one case — a release, a detector,
 * optionally a readout node and a row, an exact observation date, an energy grid and a channel
 * grouping — made from the release's published model document alone (model/case.ts, the same
 * code the site's response page runs in the browser). Nothing is written unless every choice is
 * valid.
 */
import { builtReleaseKey } from '../pipeline/compare-releases.ts';
import { existsSync, mkdirSync, readFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { KilnInputError } from '../errors.ts';
import { optFlag, optString, UsageError, type CommandSpec, type ParsedArgs } from './args.ts';

const DEFAULT_FROM = '.kiln/out';

/** CLI field names are the options. */
function asOption(e: unknown, gridFile: string | undefined): never {
  if (e instanceof KilnInputError && e.where.field && !e.where.field.startsWith('--'))
    throw new KilnInputError(e.message, { ...e.where, file: e.where.file ?? (e.where.field === 'energy-grid' ? gridFile : undefined), field: `--${e.where.field}` });
  throw e;
}

export async function runResponse(args: ParsedArgs, write: (s: string) => void = (s) => process.stdout.write(s)): Promise<number> {
  const { sha256Hex } = await import('../pipeline/hash.ts');
  const { parseModelDocument } = await import('../model/parse.ts');
  const { buildCase } = await import('../model/case.ts');
  const { parseEnergyEdges, parseEnergyRange, parseWhole } = await import('../model/request.ts');
  const { MODEL_FILE } = await import('../model/types.ts');
  const { writeFileAtomic } = await import('../node/files.ts');

  const release = optString(args, 'release');
  const detector = optString(args, 'detector');
  const date = optString(args, 'date');
  if (!release) throw new UsageError('--release ID is required');
  if (!detector) throw new UsageError('--detector ID is required');
  if (!date) throw new UsageError('--date YYYY-MM-DD is required (the observation date: contamination is evaluated on it)');
  const energiesText = optString(args, 'energies');
  const gridFile = optString(args, 'energy-grid');
  if (energiesText !== undefined && gridFile !== undefined) throw new UsageError('give --energies or --energy-grid, not both');
  const from = optString(args, 'from') ?? DEFAULT_FROM;
  const outDir = resolve(optString(args, 'out') ?? '.');

  const modelPath = join(from, 'releases', builtReleaseKey(from, release).key, MODEL_FILE);
  if (!existsSync(modelPath)) {
    const have = existsSync(join(from, 'releases')) ? `a release of ${from} with a model document` : `a build output directory (run kiln build first, or give --from DIR)`;
    throw new KilnInputError(`no model document for release ${release}`, { file: modelPath, field: '--release', value: release, expected: have });
  }
  const bytes = readFileSync(modelPath);
  const doc = parseModelDocument(bytes.toString('utf8'), modelPath);
  const sha = sha256Hex(bytes);
  let result;
  try {
    const nodeText = optString(args, 'node');
    const rowText = optString(args, 'row');
    const groupText = optString(args, 'group');
    let energies;
    if (gridFile !== undefined) {
      if (!existsSync(gridFile)) throw new KilnInputError('energy grid file not found', { file: gridFile, field: '--energy-grid', expected: 'a file of bin edges in keV' });
      energies = parseEnergyEdges(readFileSync(gridFile, 'utf8'));
    } else energies = energiesText !== undefined ? parseEnergyRange(energiesText) : ({ kind: 'model' } as const);
    result = buildCase(doc, sha, {
      detector,
      node: nodeText ?? null,
      row: rowText === undefined ? null : parseWhole(rowText, 'row', 0, 'a row number'),
      date,
      energies,
      group: groupText === undefined ? 1 : parseWhole(groupText, 'group', 1, 'a channel grouping'),
      rsp: optFlag(args, 'rsp'),
    });
  } catch (e) {
    asOption(e, gridFile);
  }
  // mkdir without `recursive` when the parent exists: a read-only disk then says so (EROFS)
  // instead of the recursive form's misleading ENOENT.
  if (!existsSync(outDir)) mkdirSync(outDir, { recursive: !existsSync(dirname(outDir)) });
  for (const f of result!.files) {
    writeFileAtomic(join(outDir, f.name), f.fits);
    write(`${join(outDir, f.name)}  ${f.fits.length} bytes  SHA-256 ${sha256Hex(f.fits)}\n`);
  }
  write(`region ${result!.region.label}, epoch ${result!.epoch}, model document SHA-256 ${sha}\n`);
  return 0;
}

export const command: CommandSpec = {
  name: 'response',
  summary: 'Make the RMF and ARF for one detector position and observation date from a release\'s model document',
  usage: 'kiln response --release ID --detector D [--node N] [--row R] --date YYYY-MM-DD [--energies lo:hi:n | --energy-grid FILE] [--group N] [--out DIR] [--rsp] [--from DIR]',
  options: [
    { name: 'release', arg: 'ID', help: 'release id (its model document is read from the build output)' },
    { name: 'detector', arg: 'D', help: 'detector id' },
    { name: 'node', arg: 'N', help: 'readout node id (default: the whole detector)' },
    { name: 'row', arg: 'R', help: 'row (transfer count) of the source; the row band holding it is used (default: all rows)' },
    { name: 'date', arg: 'YYYY-MM-DD', help: 'observation date: contamination is evaluated on this date' },
    { name: 'energies', arg: 'lo:hi:n', help: 'n linear energy bins from lo to hi keV (default: the model\'s grid)' },
    { name: 'energy-grid', arg: 'FILE', help: 'energy bin edges in keV, one per line' },
    { name: 'group', arg: 'N', help: 'merge N channels into one (N divides the channel count; default 1)' },
    { name: 'out', arg: 'DIR', help: 'directory for the files (default: the current directory)' },
    { name: 'rsp', help: 'also write the full response (RMF × ARF)' },
    { name: 'from', arg: 'DIR', help: `build output holding releases/<id>/model.json (default ${DEFAULT_FROM})` },
  ],
  positionals: { min: 0, max: 0, names: '' },
  run: (args) => runResponse(args),
};
