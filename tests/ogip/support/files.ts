/**
 * Small in-memory FITS files for the OGIP reader tests (written with Kiln's FITS layer, which its
 * own suite checks against astropy and fitsjs), and a helper that returns the error a call throws.
 */
import { readFits, writeFits, type BinTableHduInput, type CardInput, type FitsFile } from '../../../generators/fits/index.ts';
import type { ResponseMeta } from '../../../generators/response/types.ts';
import { KilnInputError } from '../../../generators/errors.ts';

/** Invented test mission; no DETNAM, HISTORY or CREATOR, so that their absence can be checked. */
export const BARE_META: ResponseMeta = { telescop: 'TESTSAT', instrume: 'TESTCAM', filter: 'OPEN', chantype: 'PI', date: '2024-05-01' };

/** A file of a primary HDU (with `primaryCards`) and the given BINTABLE extensions, read back. */
export function fileOf(extensions: BinTableHduInput[], opts: { primaryCards?: CardInput[]; fileName?: string } = {}): FitsFile {
  return readFits(writeFits([{ kind: 'primary', cards: opts.primaryCards }, ...extensions]), { fileName: opts.fileName });
}

export function table(name: string, columns: BinTableHduInput['columns'], cards: CardInput[] = []): BinTableHduInput {
  return { kind: 'bintable', name, columns, cards };
}

/** HDUCLASn cards (OGIP CAL/GEN/92-002 and OGIP/92-007 class keywords). */
export function classCards(hduclas1: string, hduclas2?: string): CardInput[] {
  const cards: CardInput[] = [
    { keyword: 'HDUCLASS', value: 'OGIP' },
    { keyword: 'HDUCLAS1', value: hduclas1 },
  ];
  if (hduclas2 !== undefined) cards.push({ keyword: 'HDUCLAS2', value: hduclas2 });
  return cards;
}

/** A character column standing where a numeric one belongs. */
export function textColumn(name: string, rows: number): BinTableHduInput['columns'][number] {
  return { name, tform: '4A', data: Array.from({ length: rows }, () => 'x') };
}

/** The KilnInputError `f` throws (fails the test when it throws nothing or something else). */
export function inputError(f: () => unknown): KilnInputError {
  try {
    f();
  } catch (e) {
    if (e instanceof KilnInputError) return e;
    throw e;
  }
  throw new Error('expected a KilnInputError, nothing was thrown');
}
