/** Which OGIP product a FITS file holds, from EXTNAME and HDUCLASn. */
import { findHdu, type FitsFile } from '../fits/index.ts';
import { isArfHeader } from './arf.ts';
import { isPhaHeader } from './pha.ts';
import { isMatrixHeader } from './rmf.ts';

export type OgipProduct = 'rmf' | 'arf' | 'pha';

export function identifyProduct(file: FitsFile): OgipProduct | null {
  const tables = file.hdus.filter((h) => h.table !== null);
  if (findHdu(file, 'MATRIX') || findHdu(file, 'SPECRESP MATRIX') || tables.some((h) => isMatrixHeader(h.header))) return 'rmf';
  if (findHdu(file, 'SPECRESP') || tables.some((h) => isArfHeader(h.header))) return 'arf';
  if (findHdu(file, 'SPECTRUM') || tables.some((h) => isPhaHeader(h.header))) return 'pha';
  return null;
}
