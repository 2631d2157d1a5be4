/** Pieces shared by the OGIP writers and readers: mandatory keywords, column access. */
import { KilnInputError } from '../errors.ts';
import { fitsFail, findHdu, real, type CardInput, type ColumnValues, type FitsFile, type FitsHdu, type FitsHeader } from '../fits/index.ts';
import type { ResponseMeta } from '../response/types.ts';

/** HDUCLASS value of every OGIP product (OGIP CAL/GEN/92-002). */
export const OGIP_HDUCLASS = 'OGIP';
/** CREATOR written when the caller gives none. */
export const DEFAULT_CREATOR = 'kiln';
/** OGIP default first channel when TLMIN is absent (OGIP CAL/GEN/92-002a, F_CHAN/TLMIN). */
export const OGIP_DEFAULT_FIRST_CHANNEL = 1;

/** TELESCOP, INSTRUME, DETNAM, FILTER, in the order of OGIP CAL/GEN/92-002. */
export function instrumentCards(meta: ResponseMeta): CardInput[] {
  const cards: CardInput[] = [
    { keyword: 'TELESCOP', value: meta.telescop, comment: 'mission or telescope name' },
    { keyword: 'INSTRUME', value: meta.instrume, comment: 'instrument name' },
  ];
  if (meta.detnam !== undefined) cards.push({ keyword: 'DETNAM', value: meta.detnam, comment: 'detector name' });
  cards.push({ keyword: 'FILTER', value: meta.filter, comment: 'filter in use' });
  return cards;
}

/** CREATOR, DATE, extra keywords and HISTORY lines, after the product keywords. */
export function trailerCards(meta: ResponseMeta): CardInput[] {
  const cards: CardInput[] = [
    { keyword: 'CREATOR', value: meta.creator ?? DEFAULT_CREATOR, comment: 'program that wrote this file' },
    { keyword: 'DATE', value: meta.date, comment: 'file creation date (YYYY-MM-DD)' },
  ];
  for (const k of meta.extraKeywords ?? []) cards.push({ keyword: k.keyword, value: k.value, comment: k.comment });
  for (const h of meta.history ?? []) cards.push({ keyword: 'HISTORY', comment: h });
  return cards;
}

export function primaryCards(meta: ResponseMeta): CardInput[] {
  return [
    ...instrumentCards(meta).filter((c) => c.keyword === 'TELESCOP' || c.keyword === 'INSTRUME'),
    { keyword: 'CREATOR', value: meta.creator ?? DEFAULT_CREATOR, comment: 'program that wrote this file' },
    { keyword: 'DATE', value: meta.date, comment: 'file creation date (YYYY-MM-DD)' },
  ];
}

/** Floating values that must be written with a decimal point. */
export const r = real;

/** Reads the shared meta keywords as found (missing strings become ''); validation looks at raw headers. */
export function readMeta(h: FitsHeader, primary?: FitsHeader): ResponseMeta {
  const str = (k: string) => {
    const v = h.get(k) ?? primary?.get(k);
    return v === undefined || v === null ? '' : String(v);
  };
  const meta: ResponseMeta = {
    telescop: str('TELESCOP'),
    instrume: str('INSTRUME'),
    filter: str('FILTER'),
    // Foreign files may carry any string here; the check module reports values other than PI/PHA.
    chantype: str('CHANTYPE') as ResponseMeta['chantype'],
    date: str('DATE'),
  };
  if (h.has('DETNAM')) meta.detnam = str('DETNAM');
  if (h.has('CREATOR') || primary?.has('CREATOR')) meta.creator = str('CREATOR');
  const history = h.commentary('HISTORY');
  if (history.length) meta.history = history;
  return meta;
}

/** Upper-cased, trimmed string keyword, or ''. */
export function upper(h: FitsHeader, keyword: string): string {
  const v = h.get(keyword);
  if (typeof v !== 'string') return '';
  // Stryker disable next-line MethodExpression: the FITS reader already drops trailing blanks (not significant, FITS Standard 4.0 §4.2.1.1), so trim() only forgives leading blanks; those make a value that is none of the OGIP class values, and no standard says how to read it (kept lenient, as the checks' keyword comparisons are).
  const trimmed = v.trim();
  return trimmed.toUpperCase();
}

/** First BINTABLE with one of the EXTNAMEs, else the first whose HDUCLAS keywords match. */
export function findExtension(file: FitsFile, names: string[], match: (h: FitsHeader) => boolean): FitsHdu | undefined {
  for (const n of names) {
    const h = findHdu(file, n);
    if (h && h.table) return h;
  }
  return file.hdus.find((h) => h.table !== null && match(h.header));
}

/** Values of a column (name matched case-insensitively); throws when the column is missing. */
export function requireColumn(hdu: FitsHdu, name: string): ColumnValues {
  const col = hdu.table?.column(name);
  if (!col) {
    fitsFail(hdu.header.ctx, `missing column ${name}`, {
      expected: `a ${name} column in ${hdu.name || `HDU ${hdu.index}`} (columns found: ${hdu.table?.columns.map((c) => c.name).join(', ') || 'none'})`,
    });
  }
  return hdu.table!.values.get(col.name)!;
}

export function optionalColumn(hdu: FitsHdu, name: string): ColumnValues | undefined {
  const col = hdu.table?.column(name);
  return col ? hdu.table!.values.get(col.name) : undefined;
}

/** A scalar numeric column as Float64Array (first element of each cell for vector columns). */
export function toFloat64(values: ColumnValues, hdu: FitsHdu, name: string): Float64Array {
  const out = new Float64Array(values.length);
  for (let i = 0; i < values.length; i++) {
    const v = values[i] as unknown;
    if (typeof v === 'number') out[i] = v;
    else if (typeof v === 'bigint') out[i] = Number(v);
    else if (ArrayBuffer.isView(v) || Array.isArray(v)) {
      const c = v as ArrayLike<number | bigint | boolean>;
      out[i] = c.length ? Number(c[0]) : NaN;
    } else notNumeric(hdu, name);
  }
  return out;
}

/** Every row of a numeric column as a list of numbers (a scalar column gives one per row). */
export function toCells(values: ColumnValues, hdu: FitsHdu, name: string): ArrayLike<number>[] {
  // Stryker disable next-line ArrayDeclaration: every index below values.length is assigned in the loop (or the call throws), so an array grown from empty ends the same.
  const out: ArrayLike<number>[] = new Array(values.length);
  for (let i = 0; i < values.length; i++) {
    const v = values[i] as unknown;
    if (typeof v === 'number') out[i] = [v];
    else if (typeof v === 'bigint') out[i] = [Number(v)];
    else if (v instanceof BigInt64Array) out[i] = Array.from(v, Number);
    else if (ArrayBuffer.isView(v)) out[i] = v as unknown as ArrayLike<number>;
    else notNumeric(hdu, name);
  }
  return out;
}

function notNumeric(hdu: FitsHdu, name: string): never {
  throw new KilnInputError(`column ${name} is not numeric`, {
    file: hdu.header.ctx.fileName,
    field: `HDU ${hdu.index} (${hdu.name}) column ${name}`,
    expected: 'a numeric column (B, I, J, K, E or D)',
  });
}
