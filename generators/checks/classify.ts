/**
 * Which product a file is. The OGIP module's identifyProduct decides when it can; for OGIP-wrong
 * files it cannot place (e.g. an RMF that lost its MATRIX but kept EBOUNDS), fall back to the
 * EBOUNDS name and then the file name's suffix (common practice: .rmf/.rsp, .arf, .pha/.pi).
 */
import type { FitsFile } from '../fits/index.ts';
import { identifyProduct } from '../ogip/index.ts';
import type { CheckedKind } from './types.ts';

export function classifyFile(file: FitsFile, fileName: string): CheckedKind {
  const known = identifyProduct(file);
  if (known) return known;
  if (file.hdus.some((h) => h.index > 0 && h.name.trim().toUpperCase() === 'EBOUNDS')) return 'rmf';
  const name = fileName.toLowerCase().replace(/\.gz$/, '').replace(/\.(fits|fit|fts)$/, '');
  if (/\.(rmf|rsp)$/.test(name)) return 'rmf';
  if (/\.arf$/.test(name)) return 'arf';
  if (/\.(pha|pi)$/.test(name)) return 'pha';
  return 'unknown';
}
