/**
 * Binary-table column descriptions: TFORMn parsing (FITS Standard 4.0 §7.3.1, Table 18) and the
 * per-column keywords TTYPEn, TUNITn, TLMINn, TLMAXn, TSCALn, TZEROn.
 */
import { fitsFail, type FitsContext } from './errors.ts';
import type { FitsHeader } from './header.ts';

/** Element data types supported here (FITS 4.0 Table 18; X, C, M are not used by OGIP products). */
export type ElementType = 'L' | 'B' | 'I' | 'J' | 'K' | 'E' | 'D' | 'A';

/** Bytes per element (FITS 4.0 Table 18). */
export const ELEMENT_BYTES: Record<ElementType, number> = { L: 1, B: 1, I: 2, J: 4, K: 8, E: 4, D: 8, A: 1 };
/** Bytes of a variable-length array descriptor: P = two 32-bit, Q = two 64-bit integers (FITS 4.0 §7.3.5). */
export const DESCRIPTOR_BYTES = { P: 8, Q: 16 } as const;

export interface TForm {
  /** Repeat count r of rT, or 1 for a descriptor column. */
  repeat: number;
  type: ElementType;
  /** Variable-length array descriptor kind, if any. */
  descriptor: 'P' | 'Q' | null;
  /** Maximum array length from rPt(emax), when given. */
  maxLength?: number;
  /** Bytes this column takes in each table row. */
  widthBytes: number;
}

const FIXED_RE = /^([0-9]*)([LBIJKEDAXCM])(.*)$/;
const VAR_RE = /^([01]?)([PQ])([LBIJKEDAXCM])(?:\(([0-9]+)\))?$/;

export function parseTForm(tform: string, ctx?: FitsContext, keyword?: string): TForm {
  const t = tform.trim();
  const bad = (why: string): never =>
    fitsFail(ctx, `bad TFORM: ${why}`, {
      keyword,
      value: tform,
      expected: 'rT with T one of L B I J K E D A (e.g. 1E, 8A, 3J) or a descriptor rPt(emax) such as 1PE or 1PJ(40)',
    });
  const v = VAR_RE.exec(t);
  if (v) {
    const type = v[3] as ElementType;
    if (!(type in ELEMENT_BYTES)) bad(`element type ${type} is not supported`);
    const descriptor = v[2] as 'P' | 'Q';
    const repeat = v[1] === '' ? 1 : Number(v[1]);
    return {
      repeat,
      type,
      descriptor,
      maxLength: v[4] !== undefined ? Number(v[4]) : undefined,
      widthBytes: repeat * DESCRIPTOR_BYTES[descriptor],
    };
  }
  const f = FIXED_RE.exec(t);
  if (!f) return bad('unrecognised form');
  const type = f[2] as ElementType;
  if (!(type in ELEMENT_BYTES)) return bad(`element type ${type} is not supported`);
  // Only A may carry a trailing width (rAw, FITS 4.0 §7.3.1 note); anything else is junk.
  if (f[3] !== '' && !(type === 'A' && /^[0-9]+$/.test(f[3]))) return bad(`unexpected "${f[3]}" after the type code`);
  const repeat = f[1] === '' ? 1 : Number(f[1]);
  if (!Number.isSafeInteger(repeat)) return bad('repeat count too large');
  return { repeat, type, descriptor: null, widthBytes: repeat * ELEMENT_BYTES[type] };
}

/** Formats a TFORM value from its parts. */
export function formatTForm(t: Omit<TForm, 'widthBytes'>): string {
  if (t.descriptor) return `1${t.descriptor}${t.type}${t.maxLength !== undefined ? `(${t.maxLength})` : ''}`;
  return `${t.repeat}${t.type}`;
}

export interface ColumnInfo {
  /** 1-based column number n. */
  index: number;
  name: string;
  tform: string;
  form: TForm;
  /** Byte offset of this column within a row. */
  offsetBytes: number;
  unit?: string;
  tlmin?: number;
  tlmax?: number;
  tscal?: number;
  tzero?: number;
}

/** Reads TFIELDS column descriptions and checks that their widths add up to NAXIS1. */
export function readColumns(header: FitsHeader, nFields: number, rowBytes: number): ColumnInfo[] {
  const ctx = header.ctx;
  const cols: ColumnInfo[] = [];
  let offset = 0;
  for (let n = 1; n <= nFields; n++) {
    const tformKey = `TFORM${n}`;
    const tform = header.getString(tformKey);
    if (tform === undefined) fitsFail(ctx, `missing ${tformKey}`, { keyword: tformKey, expected: `a TFORMn card for each of the TFIELDS = ${nFields} columns` });
    const form = parseTForm(tform, { ...ctx }, tformKey);
    const name = header.getString(`TTYPE${n}`) ?? `COL${n}`;
    cols.push({
      index: n,
      name,
      tform,
      form,
      offsetBytes: offset,
      unit: header.getString(`TUNIT${n}`),
      tlmin: header.getNumber(`TLMIN${n}`),
      tlmax: header.getNumber(`TLMAX${n}`),
      tscal: header.getNumber(`TSCAL${n}`),
      tzero: header.getNumber(`TZERO${n}`),
    });
    offset += form.widthBytes;
  }
  if (offset !== rowBytes) {
    fitsFail(ctx, 'column widths do not add up to the row length', {
      keyword: 'NAXIS1',
      value: rowBytes,
      expected: `NAXIS1 = ${offset}, the sum of the TFORMn widths`,
    });
  }
  return cols;
}
