/**
 * What `kiln fold`, `kiln simulate` and `kiln fit` share: reading a source document, a response
 * (RMF and ARF) and the bands and pile-up inputs of an instrument, with errors naming the file.
 */
import { basename, dirname, join } from 'node:path';
import { KilnInputError } from '../errors.ts';
import { readArf, readRmf } from '../ogip/index.ts';
import { readFitsFile } from '../node/index.ts';
import { SPECTRAL_FILE, type SourceSpec, type SpectralDoc } from '../content/index.ts';
import { DEFAULT_ABUNDANCES, fluxGrid, foldingResponse, type Band, type FluxGrid, type FoldingResponse } from '../spectrum/index.ts';
import { optString, UsageError, type OptionSpec, type ParsedArgs } from './args.ts';

export interface LoadedResponse {
  response: FoldingResponse;
  grid: FluxGrid;
  rmfPath: string;
  arfPath: string | null;
  /** DATE of the RMF (the default DATE of a simulated spectrum). */
  date: string;
}

export function loadResponse(rmfPath: string, arfPath: string | null): LoadedResponse {
  const rmf = readRmf(readFitsFile(rmfPath)).data;
  const arf = arfPath ? readArf(readFitsFile(arfPath)).data : null;
  const response = foldingResponse({ rmf, rmfName: rmfPath, arf, arfName: arfPath });
  return { response, grid: fluxGrid(response.energLoKeV, response.energHiKeV, DEFAULT_ABUNDANCES), rmfPath, arfPath, date: rmf.meta.date };
}

export async function loadSource(path: string): Promise<SourceSpec> {
  const content = await import('../content/index.ts');
  return content.loadSourceFile(path);
}

/** The grid of the source's own abundance table, when it differs from the default. */
export function gridFor(r: LoadedResponse, s: SourceSpec): FluxGrid {
  return s.model.abundances === r.grid.abundances ? r.grid : fluxGrid(r.response.energLoKeV, r.response.energHiKeV, s.model.abundances);
}

export async function checkSourceFits(s: SourceSpec, r: FoldingResponse): Promise<void> {
  const content = await import('../content/index.ts');
  content.checkSourceInRange(s, r.energLoKeV[0], r.energHiKeV[r.energHiKeV.length - 1]);
}

export async function loadSpectral(path: string): Promise<SpectralDoc> {
  const content = await import('../content/index.ts');
  const ins = await content.loadInstrumentFile(path);
  if (!ins.spectral) throw new KilnInputError('the instrument has no spectral settings', { file: join(dirname(path), SPECTRAL_FILE), expected: 'a spectral.yaml beside instrument.yaml with bands, pileup and impact (README "Reference sources and impact")' });
  return ins.spectral;
}

const NUMBER_RE = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;

export function positiveOption(args: ParsedArgs, name: string): number | undefined {
  const s = optString(args, name);
  if (s === undefined) return undefined;
  const v = NUMBER_RE.test(s) ? Number(s) : NaN;
  if (!(v > 0) || !Number.isFinite(v)) throw new UsageError(`--${name}: "${s}" is not a positive number`);
  return v;
}

/** "soft:0.3-2,hard:2-10" or "0.5-2,2-10" → bands. */
export function parseBands(text: string): Band[] {
  return text.split(',').filter((x) => x.trim()).map((item, i) => {
    const m = /^\s*(?:([a-z0-9][a-z0-9._-]*):)?([0-9.eE+]+)-([0-9.eE+]+)\s*$/.exec(item);
    const lo = m ? Number(m[2]) : NaN;
    const hi = m ? Number(m[3]) : NaN;
    if (!m || !(lo >= 0) || !(hi > lo)) throw new UsageError(`--bands: "${item}" is not a band LO-HI in keV (e.g. soft:0.3-2,hard:2-10)`);
    return { name: m[1] ?? `band${i + 1}`, loKeV: lo, hiKeV: hi };
  });
}

export const RESPONSE_OPTIONS: OptionSpec[] = [
  { name: 'rmf', arg: 'FILE', help: 'redistribution matrix (OGIP RMF, .gz accepted)' },
  { name: 'arf', arg: 'FILE', help: 'effective area (OGIP ARF); not needed with a full response (HDUCLAS3 FULL)' },
];

export function responsePaths(args: ParsedArgs): { rmf: string; arf: string | null } {
  const rmf = optString(args, 'rmf');
  if (!rmf) throw new UsageError('--rmf FILE is required');
  return { rmf, arf: optString(args, 'arf') ?? null };
}

export function fileName(path: string | null): string {
  return path ? basename(path) : 'none';
}

/** Progress lines on stderr once a job has run for a while (quick jobs stay quiet). */
export const PROGRESS_AFTER_MS = 1000;
export function progressLine(label: string): (line: string) => void {
  const t0 = performance.now();
  return (line) => {
    const dt = performance.now() - t0;
    if (dt >= PROGRESS_AFTER_MS) process.stderr.write(`kiln ${label}: ${line} [${(dt / 1000).toFixed(1)} s]\n`);
  };
}
