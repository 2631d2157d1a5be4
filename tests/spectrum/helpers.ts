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
