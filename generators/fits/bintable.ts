/**
 * BINTABLE data: encode rows and heap from columns, and decode them back (FITS Standard 4.0 §7.3).
 * All numbers big-endian; variable-length arrays live in the heap after the table (§7.3.5).
 */
import { ELEMENT_BYTES, formatTForm, parseTForm, readColumns, type ColumnInfo, type ElementType, type TForm } from './column.ts';
import { paddedLength, type CardInput, type FitsHeader } from './header.ts';
import { fitsFail, type FitsContext } from './errors.ts';

export type NumericArray = Uint8Array | Int16Array | Int32Array | BigInt64Array | Float32Array | Float64Array;
/** One cell of a vector or variable-length column. */
export type CellArray = NumericArray | boolean[] | string;
/**
 * Column values as read: scalar columns give one typed array (K: BigInt64Array), boolean[] (L)
 * or string[] (A); repeat > 1 and P/Q columns give one array per row.
 */
export type ColumnValues = NumericArray | boolean[] | string[] | CellArray[];

/** Values accepted for writing: like ColumnValues, with plain number arrays allowed. */
export type ColumnData =
  | ArrayLike<number>
  | ArrayLike<bigint>
  | boolean[]
  | string[]
  | ArrayLike<ArrayLike<number> | ArrayLike<bigint> | boolean[]>;

export interface ColumnInput {
  name: string;
  /** TFORM such as "1E", "3J", "12A", "1PE", "1PJ"; descriptor max lengths are filled in. */
  tform: string;
  unit?: string;
  tlmin?: number;
  tlmax?: number;
  data: ColumnData;
}

/** Integer ranges of the FITS integer types (FITS 4.0 Table 18). */
const INT_RANGE: Partial<Record<ElementType, [number, number]>> = {
  B: [0, 255],
  I: [-32768, 32767],
  J: [-2147483648, 2147483647],
};
/** Decoded variable-length data may exceed the heap only by this factor (descriptors can share heap bytes). */
export const VLA_EXPANSION_LIMIT = 16;
const ASCII_T = 0x54;
const ASCII_F = 0x46;

export interface EncodedTable {
  /** NAXIS1, NAXIS2, PCOUNT, GCOUNT, TFIELDS and the per-column cards, in standard order. */
  cards: CardInput[];
  /** Table followed by the heap, unpadded. */
  data: Uint8Array;
  nRows: number;
  rowBytes: number;
  heapBytes: number;
}

function badValue(v: unknown, where: () => string, ctx: FitsContext | undefined, expected: string): never {
  return fitsFail(ctx, `bad value in column ${where()}`, { value: v, expected });
}

// Called once per element: no closures inside (each would be an allocation per element).
function writeElement(view: DataView, at: number, type: ElementType, v: unknown, where: () => string, ctx?: FitsContext): void {
  switch (type) {
    case 'L':
      if (typeof v !== 'boolean') badValue(v, where, ctx, 'true or false');
      view.setUint8(at, v ? ASCII_T : ASCII_F);
      return;
    case 'K': {
      const b = typeof v === 'bigint' ? v : typeof v === 'number' && Number.isSafeInteger(v) ? BigInt(v) : badValue(v, where, ctx, 'a 64-bit integer');
      view.setBigInt64(at, b);
      return;
    }
    case 'E':
    case 'D':
      if (typeof v !== 'number') badValue(v, where, ctx, 'a number');
      if (type === 'E') view.setFloat32(at, v as number);
      else view.setFloat64(at, v as number);
      return;
    default: {
      const [lo, hi] = INT_RANGE[type]!;
      if (typeof v !== 'number' || !Number.isInteger(v) || v < lo || v > hi) badValue(v, where, ctx, `an integer in [${lo}, ${hi}]`);
      if (type === 'B') view.setUint8(at, v as number);
      else if (type === 'I') view.setInt16(at, v as number);
      else view.setInt32(at, v as number);
    }
  }
}

function writeString(bytes: Uint8Array, at: number, width: number, s: unknown, where: () => string, ctx?: FitsContext): void {
  if (typeof s !== 'string' || s.length > width || /[^\x20-\x7e]/.test(s)) {
    fitsFail(ctx, `bad value in column ${where()}`, { value: s, expected: `a printable ASCII string of at most ${width} characters` });
  }
  for (let i = 0; i < width; i++) bytes[at + i] = i < s.length ? s.charCodeAt(i) : 0x20;
}

/** Sizes and header cards of a binary table, computed before any byte is written. */
export interface BinTablePlan {
  cards: CardInput[];
  nRows: number;
  rowBytes: number;
  heapBytes: number;
  /** Table plus heap, unpadded. */
  dataBytes: number;
  /** Writes the table and heap into `data` (zero-filled, at least dataBytes long, at its offset 0). */
  fill(data: Uint8Array): void;
}

export function planBinTable(columns: ColumnInput[], ctx?: FitsContext): BinTablePlan {
  const nRows = columns.length ? columns[0].data.length : 0;
  const forms: TForm[] = columns.map((c, i) => {
    const f = parseTForm(c.tform, ctx, `TFORM${i + 1}`);
    if (c.data.length !== nRows) {
      fitsFail(ctx, `column ${c.name} has ${c.data.length} rows`, { keyword: `TTYPE${i + 1}`, expected: `${nRows} rows like column ${columns[0].name}` });
    }
    if (f.descriptor === 'Q') fitsFail(ctx, `column ${c.name}: Q descriptors are not written`, { value: c.tform, expected: 'a P descriptor such as 1PE' });
    return f;
  });
  const rowBytes = forms.reduce((s, f) => s + f.widthBytes, 0);
  // Heap size first: one contiguous heap, arrays in row order then column order.
  let heapBytes = 0;
  const maxLen = forms.map(() => 0);
  columns.forEach((c, j) => {
    if (!forms[j].descriptor) return;
    for (let r = 0; r < nRows; r++) {
      const cell = (c.data as ArrayLike<unknown>)[r];
      const len = typeof cell === 'string' ? cell.length : (cell as ArrayLike<unknown>).length;
      maxLen[j] = Math.max(maxLen[j], len);
      heapBytes += len * ELEMENT_BYTES[forms[j].type];
    }
  });
  const tableBytes = rowBytes * nRows;
  const cards: CardInput[] = [
    { keyword: 'NAXIS1', value: rowBytes, comment: 'width of table in bytes' },
    { keyword: 'NAXIS2', value: nRows, comment: 'number of rows in table' },
    { keyword: 'PCOUNT', value: heapBytes, comment: 'size of special data area (heap)' },
    { keyword: 'GCOUNT', value: 1, comment: 'one data group' },
    { keyword: 'TFIELDS', value: columns.length, comment: 'number of fields in each row' },
  ];
  columns.forEach((c, j) => {
    const n = j + 1;
    const f = forms[j];
    const tform = f.descriptor ? formatTForm({ ...f, maxLength: maxLen[j] }) : c.tform.trim();
    cards.push({ keyword: `TTYPE${n}`, value: c.name }, { keyword: `TFORM${n}`, value: tform });
    if (c.unit !== undefined) cards.push({ keyword: `TUNIT${n}`, value: c.unit });
    if (c.tlmin !== undefined) cards.push({ keyword: `TLMIN${n}`, value: c.tlmin });
    if (c.tlmax !== undefined) cards.push({ keyword: `TLMAX${n}`, value: c.tlmax });
  });
  const fill = (data: Uint8Array): void => {
    const view = new DataView(data.buffer, data.byteOffset, data.byteLength);
    let heapPos = 0;
    for (let r = 0; r < nRows; r++) {
      let off = r * rowBytes;
      columns.forEach((c, j) => {
        const f = forms[j];
        const where = () => `${c.name} row ${r + 1}`;
        const cell = (c.data as ArrayLike<unknown>)[r];
        if (f.descriptor) {
          const el = ELEMENT_BYTES[f.type];
          const heapAt = tableBytes + heapPos;
          let len: number;
          if (f.type === 'A') {
            const s = cell as string;
            len = typeof s === 'string' ? s.length : -1;
            writeString(data, heapAt, Math.max(len, 0), s, where, ctx);
          } else {
            const arr = cell as ArrayLike<unknown>;
            if (arr === null || typeof arr !== 'object' || typeof arr.length !== 'number') fitsFail(ctx, `bad value in column ${where()}`, { expected: 'an array for a variable-length column' });
            len = arr.length;
            // Typed arrays of the column's own type need no per-element validation (matrix rows).
            if (f.type === 'E' && arr instanceof Float32Array) for (let k = 0; k < len; k++) view.setFloat32(heapAt + 4 * k, arr[k]);
            else if (f.type === 'J' && arr instanceof Int32Array) for (let k = 0; k < len; k++) view.setInt32(heapAt + 4 * k, arr[k]);
            else if (f.type === 'D' && arr instanceof Float64Array) for (let k = 0; k < len; k++) view.setFloat64(heapAt + 8 * k, arr[k]);
            else for (let k = 0; k < len; k++) writeElement(view, heapAt + k * el, f.type, arr[k], where, ctx);
          }
          view.setInt32(off, len);
          view.setInt32(off + 4, heapPos);
          heapPos += len * el;
        } else if (f.type === 'A') {
          writeString(data, off, f.repeat, cell, where, ctx);
        } else if (f.repeat === 1) {
          writeElement(view, off, f.type, cell, where, ctx);
        } else {
          const arr = cell as ArrayLike<unknown>;
          if (arr === null || typeof arr !== 'object' || arr.length !== f.repeat) {
            fitsFail(ctx, `bad value in column ${where()}`, { expected: `an array of exactly ${f.repeat} elements (TFORM ${c.tform})` });
          }
          const el = ELEMENT_BYTES[f.type];
          for (let k = 0; k < f.repeat; k++) writeElement(view, off + k * el, f.type, arr[k], where, ctx);
        }
        off += f.widthBytes;
      });
    }
  };
  return { cards, nRows, rowBytes, heapBytes, dataBytes: tableBytes + heapBytes, fill };
}

/** Builds the table and heap of a BINTABLE from columns (all of the same length). */
export function encodeBinTable(columns: ColumnInput[], ctx?: FitsContext): EncodedTable {
  const plan = planBinTable(columns, ctx);
  // Room for the data unit's zero padding too, so the HDU writer need not copy the data to pad it.
  const data = new Uint8Array(paddedLength(plan.dataBytes)).subarray(0, plan.dataBytes);
  plan.fill(data);
  return { cards: plan.cards, data, nRows: plan.nRows, rowBytes: plan.rowBytes, heapBytes: plan.heapBytes };
}

export interface BinTable {
  nRows: number;
  rowBytes: number;
  columns: ColumnInfo[];
  /** Heap start relative to the data unit (THEAP) and its size in bytes. */
  heapOffset: number;
  heapBytes: number;
  /** Values by column name (first column wins when names repeat). */
  values: Map<string, ColumnValues>;
  column(name: string): ColumnInfo | undefined;
}

function newTyped(type: ElementType, n: number): NumericArray {
  switch (type) {
    case 'B':
      return new Uint8Array(n);
    case 'I':
      return new Int16Array(n);
    case 'J':
      return new Int32Array(n);
    case 'K':
      return new BigInt64Array(n);
    case 'E':
      return new Float32Array(n);
    default:
      return new Float64Array(n);
  }
}

/** Reads n elements of `type` at `at` into a new array (strings for A, booleans for L). */
function readCell(view: DataView, bytes: Uint8Array, at: number, type: ElementType, n: number, scale?: { s: number; z: number }): CellArray {
  if (type === 'A') {
    let s = '';
    for (let i = 0; i < n; i++) {
      const c = bytes[at + i];
      if (c === 0) break; // NUL ends a string early (FITS 4.0 §7.3.3.1)
      s += String.fromCharCode(c);
    }
    return s.trimEnd();
  }
  if (type === 'L') {
    const out: boolean[] = new Array(n);
    for (let i = 0; i < n; i++) out[i] = bytes[at + i] === ASCII_T;
    return out;
  }
  const el = ELEMENT_BYTES[type];
  if (scale) {
    const out = new Float64Array(n);
    for (let i = 0; i < n; i++) out[i] = Number(readOne(view, at + i * el, type)) * scale.s + scale.z;
    return out;
  }
  const out = newTyped(type, n);
  if (out instanceof BigInt64Array) for (let i = 0; i < n; i++) out[i] = view.getBigInt64(at + i * el);
  else for (let i = 0; i < n; i++) out[i] = readOne(view, at + i * el, type) as number;
  return out;
}

function readOne(view: DataView, at: number, type: ElementType): number | bigint {
  switch (type) {
    case 'B':
      return view.getUint8(at);
    case 'I':
      return view.getInt16(at);
    case 'J':
      return view.getInt32(at);
    case 'K':
      return view.getBigInt64(at);
    case 'E':
      return view.getFloat32(at);
    default:
      return view.getFloat64(at);
  }
}

/**
 * Decodes a BINTABLE data unit. `data` is exactly NAXIS1*NAXIS2 + PCOUNT bytes; `dataOffset` its
 * position in the file (for messages); `fileBytes` bounds the total decoded size.
 */
export function decodeBinTable(header: FitsHeader, data: Uint8Array, dataOffset: number, fileBytes: number): BinTable {
  const ctx = header.ctx;
  const rowBytes = header.requireInt('NAXIS1');
  const nRows = header.requireInt('NAXIS2');
  const pcount = header.getInt('PCOUNT') ?? 0;
  const nFields = header.requireInt('TFIELDS', 'an integer 0-999');
  if (nFields < 0 || nFields > 999) fitsFail(ctx, 'TFIELDS out of range', { keyword: 'TFIELDS', card: header.cardNumber('TFIELDS'), value: nFields, expected: '0 to 999 (FITS 4.0 §7.3.1)' });
  const columns = readColumns(header, nFields, rowBytes);
  const tableBytes = rowBytes * nRows;
  const theap = header.getInt('THEAP') ?? tableBytes;
  if (theap < tableBytes || theap > tableBytes + pcount) {
    fitsFail(ctx, 'THEAP is inconsistent with the table size', {
      keyword: 'THEAP',
      card: header.cardNumber('THEAP'),
      value: theap,
      expected: `NAXIS1*NAXIS2 = ${tableBytes} <= THEAP <= NAXIS1*NAXIS2 + PCOUNT = ${tableBytes + pcount}`,
    });
  }
  const heapBytes = tableBytes + pcount - theap;
  const view = new DataView(data.buffer, data.byteOffset, data.byteLength);
  const values = new Map<string, ColumnValues>();
  let vlaBudget = VLA_EXPANSION_LIMIT * Math.max(fileBytes, 1);
  for (const col of columns) {
    const f = col.form;
    const scaled = (col.tscal !== undefined && col.tscal !== 1) || (col.tzero !== undefined && col.tzero !== 0);
    if (scaled && (f.type === 'A' || f.type === 'L')) fitsFail(ctx, `TSCAL/TZERO on a ${f.type} column`, { keyword: `TFORM${col.index}`, expected: 'scaling only on numeric columns' });
    const scale = scaled ? { s: col.tscal ?? 1, z: col.tzero ?? 0 } : undefined;
    let out: ColumnValues;
    if (f.descriptor) {
      const el = ELEMENT_BYTES[f.type];
      const cells: CellArray[] = new Array(nRows);
      for (let r = 0; r < nRows; r++) {
        const at = r * rowBytes + col.offsetBytes;
        const count = f.descriptor === 'P' ? view.getInt32(at) : Number(view.getBigInt64(at));
        const off = f.descriptor === 'P' ? view.getInt32(at + 4) : Number(view.getBigInt64(at + 8));
        const need = count * el;
        if (f.repeat === 0) {
          cells[r] = readCell(view, data, 0, f.type, 0, scale);
          continue;
        }
        if (count < 0 || off < 0 || off + need > heapBytes) {
          fitsFail(ctx, `heap descriptor out of range in column ${col.name} row ${r + 1}`, {
            byteOffset: dataOffset + at,
            value: { count, offset: off },
            expected: `count >= 0 and offset + count*${el} <= heap size ${heapBytes} bytes`,
          });
        }
        vlaBudget -= need;
        if (vlaBudget < 0) {
          fitsFail(ctx, `variable-length arrays of column ${col.name} reference far more bytes than the file holds`, {
            byteOffset: dataOffset + at,
            expected: `at most ${VLA_EXPANSION_LIMIT} times the file size in total`,
          });
        }
        cells[r] = readCell(view, data, theap + off, f.type, count, scale);
      }
      out = cells;
    } else if (f.type === 'A') {
      const strs: string[] = new Array(nRows);
      for (let r = 0; r < nRows; r++) strs[r] = readCell(view, data, r * rowBytes + col.offsetBytes, 'A', f.repeat) as string;
      out = strs;
    } else if (f.repeat === 1) {
      if (f.type === 'L') {
        const b: boolean[] = new Array(nRows);
        for (let r = 0; r < nRows; r++) b[r] = data[r * rowBytes + col.offsetBytes] === ASCII_T;
        out = b;
      } else {
        const arr = scale ? new Float64Array(nRows) : newTyped(f.type, nRows);
        for (let r = 0; r < nRows; r++) {
          const v = readOne(view, r * rowBytes + col.offsetBytes, f.type);
          if (scale) (arr as Float64Array)[r] = Number(v) * scale.s + scale.z;
          else if (arr instanceof BigInt64Array) arr[r] = v as bigint;
          else (arr as Float64Array)[r] = v as number;
        }
        out = arr;
      }
    } else {
      const cells: CellArray[] = new Array(nRows);
      for (let r = 0; r < nRows; r++) cells[r] = readCell(view, data, r * rowBytes + col.offsetBytes, f.type, f.repeat, scale);
      out = cells;
    }
    if (!values.has(col.name)) values.set(col.name, out);
  }
  return {
    nRows,
    rowBytes,
    columns,
    heapOffset: theap,
    heapBytes,
    values,
    column: (name) => columns.find((c) => c.name === name) ?? columns.find((c) => c.name.toUpperCase() === name.toUpperCase()),
  };
}
