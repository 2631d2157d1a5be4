/** Locating extensions by EXTNAME (case-insensitive, blanks trimmed: FITS 4.0 §4.4.2.6). */
import type { HduView } from './types.ts';

export function findHdu(hdus: readonly HduView[], ...names: string[]): HduView | undefined {
  const want = names.map((n) => n.toUpperCase());
  return hdus.find((h) => h.index > 0 && want.includes(h.name.trim().toUpperCase()));
}
