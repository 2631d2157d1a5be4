/** A published demo response (release 1.1.0, archived bytes) for the spectral-engine tests. */
import { join } from 'node:path';
import { readArf, readRmf } from '../../generators/ogip/index.ts';
import { readFitsFile } from '../../generators/node/index.ts';
import { DEFAULT_ABUNDANCES, fluxGrid, foldingResponse, type FluxGrid, type FoldingResponse } from '../../generators/spectrum/index.ts';

export const ARCHIVE_FILES = join(import.meta.dirname, '../../content/archive/1.1.0/files');
export const RMF_FI0 = join(ARCHIVE_FILES, 'quillon-tarncam_fi0_1.1.0.rmf.gz');
export const ARF_FI0 = join(ARCHIVE_FILES, 'quillon-tarncam_fi0_e1_1.1.0.arf.gz');
export const ARF_BI1 = join(ARCHIVE_FILES, 'quillon-tarncam_bi1_e1_1.1.0.arf.gz');
export const SOURCES = join(import.meta.dirname, '../../content/instruments/quillon-tarncam/sources');
export const INSTRUMENT = join(import.meta.dirname, '../../content/instruments/quillon-tarncam/instrument.yaml');

let cached: { response: FoldingResponse; grid: FluxGrid } | null = null;
export function demoResponse(): { response: FoldingResponse; grid: FluxGrid } {
  if (cached) return cached;
  const rmf = readRmf(readFitsFile(RMF_FI0)).data;
  const arf = readArf(readFitsFile(ARF_FI0)).data;
  const response = foldingResponse({ rmf, rmfName: RMF_FI0, arf, arfName: ARF_FI0 });
  cached = { response, grid: fluxGrid(response.energLoKeV, response.energHiKeV, DEFAULT_ABUNDANCES) };
  return cached;
}

/**
 * The same response with every `factor` adjacent channels summed into one (the channel binning
 * an observer applies before fitting; probability is conserved row by row). Used where a test's
 * statement does not depend on the channel resolution and the full 1024 channels only cost time.
 */
export function regroupChannels(r: FoldingResponse, factor: number): FoldingResponse {
  if (!Number.isInteger(factor) || factor < 1 || r.detchans % factor !== 0) throw new Error(`test setup: ${r.detchans} channels do not split into groups of ${factor}`);
  const n = r.energLoKeV.length;
  const chans = r.detchans / factor;
  const dense = new Float64Array(chans);
  const rowGroup = new Int32Array(n + 1);
  const groupChannel: number[] = [];
  const groupLength: number[] = [];
  const groupOffset: number[] = [];
  const value: number[] = [];
  const rowSum = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    dense.fill(0);
    for (let g = r.rowGroup[i]; g < r.rowGroup[i + 1]; g++)
      for (let j = 0; j < r.groupLength[g]; j++) dense[Math.floor((r.groupChannel[g] + j) / factor)] += r.value[r.groupOffset[g] + j];
    rowGroup[i] = groupChannel.length;
    let first = 0;
    while (first < chans && dense[first] === 0) first++;
    let last = chans - 1;
    while (last >= first && dense[last] === 0) last--;
    if (last >= first) {
      groupChannel.push(first);
      groupLength.push(last - first + 1);
      groupOffset.push(value.length);
      for (let c = first; c <= last; c++) value.push(dense[c]);
    }
    rowSum[i] = r.rowSum[i];
  }
  rowGroup[n] = groupChannel.length;
  const bounds = (a: Float64Array, pick: (k: number) => number) => Float64Array.from({ length: chans }, (_, k) => a[pick(k)]);
  return {
    ...r,
    detchans: chans,
    channelLoKeV: bounds(r.channelLoKeV, (k) => k * factor),
    channelHiKeV: bounds(r.channelHiKeV, (k) => k * factor + factor - 1),
    rowGroup,
    groupChannel: Int32Array.from(groupChannel),
    groupLength: Int32Array.from(groupLength),
    groupOffset: Int32Array.from(groupOffset),
    value: Float32Array.from(value),
    rowSum,
  };
}
