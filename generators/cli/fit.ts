/**
 * kiln fit: fit a source model to a PHA spectrum by minimising the C-statistic, with 1σ errors
 * from ΔC = 1 profiles and a goodness measure. The response comes from --rmf/--arf or from the
 * spectrum's RESPFILE/ANCRFILE (plain file names beside the spectrum only). Exit 0 converged,
 * 1 not converged, 2 bad input.
 */
import { dirname, join } from 'node:path';
import { KilnInputError } from '../errors.ts';
import { readPha } from '../ogip/index.ts';
import { readFitsFile } from '../node/index.ts';
import { fitSpectrum, symmetricError, type SpectrumFit } from '../spectrum/index.ts';
import { optFlag, optString, UsageError, type CommandSpec, type ParsedArgs } from './args.ts';
import { checkSourceFits, gridFor, loadResponse, loadSource, progressLine, RESPONSE_OPTIONS } from './spectral-inputs.ts';

/** A RESPFILE/ANCRFILE value we follow: a plain file name in the spectrum's directory. */
const PLAIN_NAME_RE = /^[A-Za-z0-9][A-Za-z0-9._+-]*$/;

function besidePha(phaPath: string, keyword: string, value: string): string | null {
  const v = value.trim();
  if (v === '' || v.toLowerCase() === 'none') return null;
  if (!PLAIN_NAME_RE.test(v) || v.includes('..'))
    throw new KilnInputError(`${keyword} is not a plain file name beside the spectrum`, { file: phaPath, field: keyword, value: v, expected: `a file name in ${dirname(phaPath)} (or give --rmf/--arf)` });
  return join(dirname(phaPath), v);
}

function list(text: string | undefined): string[] {
  return text ? text.split(',').map((s) => s.trim()).filter(Boolean) : [];
}

function num(x: number): string {
  return x === 0 ? '0' : Math.abs(x) >= 1e-3 && Math.abs(x) < 1e7 ? String(Number(x.toPrecision(6))) : x.toExponential(5);
}

export function formatFitText(f: SpectrumFit, title: string): string {
  const rows = f.parameters.map((p) => {
    const err = p.free ? `−${num(p.errorLow ?? p.errorCurvature)}${p.lowAtBound ? ' (bound)' : ''} +${num(p.errorHigh ?? p.errorCurvature)}${p.highAtBound ? ' (bound)' : ''}` : 'fixed';
    return `  ${p.name.padEnd(28)} ${num(p.value).padStart(14)} ${err}  ${p.unit}`;
  });
  const g = f.goodness;
  return [
    title,
    `  ${f.converged ? 'converged' : 'DID NOT CONVERGE'} after ${f.iterations} iterations; C = ${num(f.cstat)} over ${f.channels} channels (${f.dof} degrees of freedom)`,
    `  goodness: expected C ${num(g.expected)} ± ${num(g.sigma)} for this model, observed ${num(g.cstat)} (z = ${g.z.toFixed(2)})`,
    '  parameter                            value  1σ (ΔC = 1)',
    ...rows,
  ].join('\n');
}

export async function runFit(args: ParsedArgs, write: (s: string) => void = (s) => process.stdout.write(s)): Promise<number> {
  const phaPath = args.positionals[0];
  const sourcePath = optString(args, 'source');
  if (!sourcePath) throw new UsageError('--source FILE is required (the model and its starting values)');
  const source = await loadSource(sourcePath);
  const { data: pha } = readPha(readFitsFile(phaPath));
  const rmfPath = optString(args, 'rmf') ?? besidePha(phaPath, 'RESPFILE', pha.respfile);
  if (!rmfPath) throw new KilnInputError('the spectrum names no response', { file: phaPath, field: 'RESPFILE', value: pha.respfile, expected: 'a file name, or give --rmf' });
  const arfPath = optString(args, 'arf') ?? besidePha(phaPath, 'ANCRFILE', pha.ancrfile);
  const r = loadResponse(rmfPath, arfPath);
  await checkSourceFits(source, r.response);
  if (pha.detchans !== r.response.detchans || pha.channel.length !== r.response.detchans)
    throw new KilnInputError('spectrum and response have different channel counts', { file: phaPath, field: 'DETCHANS', value: pha.channel.length, expected: `${r.response.detchans} channels, as in ${rmfPath}` });
  if (pha.meta.detnam !== undefined && r.response.detnam !== null && pha.meta.detnam.trim().toUpperCase() !== r.response.detnam.trim().toUpperCase())
    throw new KilnInputError('spectrum and response belong to different detectors', { file: phaPath, field: 'DETNAM', value: pha.meta.detnam, expected: `${r.response.detnam}, as in ${rmfPath}` });
  if (!(pha.exposureS > 0)) throw new KilnInputError('spectrum has no positive exposure', { file: phaPath, field: 'EXPOSURE', value: pha.exposureS, expected: 'seconds > 0' });
  const counts = new Float64Array(r.response.detchans);
  const src = pha.counts ?? (pha.rate ? pha.rate.map((x) => x * pha.exposureS) : null);
  for (let i = 0; i < pha.channel.length; i++) {
    const c = pha.channel[i] - r.response.firstChannel;
    const v = src![i];
    if (!(c >= 0 && c < r.response.detchans)) throw new KilnInputError('channel outside the response', { file: phaPath, field: `CHANNEL row ${i + 1}`, value: pha.channel[i], expected: `${r.response.firstChannel}..${r.response.firstChannel + r.response.detchans - 1}` });
    if (!(v >= 0) || !Number.isFinite(v)) throw new KilnInputError('counts are not finite and non-negative', { file: phaPath, field: `COUNTS row ${i + 1}`, value: v, expected: 'counts ≥ 0' });
    counts[c] = v;
  }
  let free = list(optString(args, 'free'));
  if (free.length === 0) free = source.free;
  const freeze = new Set(list(optString(args, 'freeze')));
  free = free.filter((f) => !freeze.has(f));
  if (free.length === 0) throw new UsageError('no free parameter left (see --free and --freeze)');
  const fit = fitSpectrum(
    { response: r.response, grid: gridFor(r, source), counts, exposureS: pha.exposureS },
    { model: source.model, free, bounds: source.bounds },
    { errors: !optFlag(args, 'no-errors'), onProgress: progressLine('fit') },
  );
  if (optFlag(args, 'json')) {
    const { expected: _e, model: _m, ...rest } = fit;
    write(JSON.stringify({ spectrum: phaPath, rmf: rmfPath, arf: arfPath, source: source.doc.id, ...rest, parameters: fit.parameters.map((p) => ({ ...p, error: p.free ? symmetricError(p) : 0 })) }) + '\n');
  } else write(formatFitText(fit, `fit of ${source.doc.id} to ${phaPath} (${rmfPath}${arfPath ? ` + ${arfPath}` : ''})`) + '\n');
  return fit.converged ? 0 : 1;
}

export const command: CommandSpec = {
  name: 'fit',
  summary: 'Fit a source model to a PHA spectrum (C-statistic), with 1σ errors from ΔC = 1 profiles. Exit 0 converged, 1 not converged, 2 bad input.',
  usage: 'kiln fit SPECTRUM --source FILE [--rmf FILE] [--arf FILE] [--free LIST] [--freeze LIST] [--no-errors] [--json]',
  options: [
    { name: 'source', arg: 'FILE', help: 'source description (YAML): the model, its starting values, free parameters and bounds' },
    ...RESPONSE_OPTIONS.map((o) => ({ ...o, help: `${o.help} (default: the spectrum's ${o.name === 'rmf' ? 'RESPFILE' : 'ANCRFILE'}, beside it)` })),
    { name: 'free', arg: 'LIST', help: "parameters to fit, comma-separated (default: the source's fit.free)" },
    { name: 'freeze', arg: 'LIST', help: 'parameters to hold at their stated values' },
    { name: 'no-errors', help: 'skip the ΔC = 1 profiles (curvature errors only)' },
    { name: 'json', help: 'print JSON' },
  ],
  positionals: { min: 1, max: 1, names: 'SPECTRUM' },
  run: (args) => runFit(args),
};
