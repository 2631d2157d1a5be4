/**
 * Redistribution matrix files (OGIP CAL/GEN/92-002 and 92-002a): a MATRIX extension in grouped
 * form with variable-length F_CHAN, N_CHAN and MATRIX, and an EBOUNDS extension.
 */
import { KilnInputError } from '../errors.ts';
import { fitsFail, writeFits, type FitsFile, type FitsHeader } from '../fits/index.ts';
import type { Ebounds, RmfData, RmfRow } from '../response/types.ts';
import {
  OGIP_DEFAULT_FIRST_CHANNEL,
  OGIP_HDUCLASS,
  findExtension,
  instrumentCards,
  primaryCards,
  r,
  readMeta,
  requireColumn,
  toCells,
  toFloat64,
  trailerCards,
  upper,
} from './common.ts';

/** HDUVERS of the MATRIX extension (OGIP CAL/GEN/92-002a). */
export const RMF_MATRIX_HDUVERS = '1.3.0';
/** HDUVERS of the EBOUNDS extension (OGIP CAL/GEN/92-002a) *(memory)*. */
export const RMF_EBOUNDS_HDUVERS = '1.2.0';
/** Largest value of a FITS 'I' column; N_GRP beyond it needs 'J'. */
const INT16_MAX = 32767;

function bad(field: string, message: string, expected: string, value?: unknown): never {
  throw new KilnInputError(message, { field, value, expected });
}

function checkRmf(d: RmfData): void {
  const n = d.energLoKeV.length;
  if (d.energHiKeV.length !== n || d.rows.length !== n) {
    bad('rows', 'energy grid and matrix rows differ in length', `ENERG_LO, ENERG_HI and rows all of length ${n}`, { energHi: d.energHiKeV.length, rows: d.rows.length });
  }
  d.rows.forEach((row, i) => {
    if (row.fChan.length !== row.nChan.length) bad(`rows[${i}]`, 'fChan and nChan differ in length', 'one first channel and one width per group');
    let total = 0;
    for (const w of row.nChan) total += w;
    if (total !== row.matrix.length) bad(`rows[${i}].matrix`, 'matrix length is not the sum of nChan', `${total} elements`, row.matrix.length);
  });
  if (d.ebounds.eMinKeV.length !== d.detchans || d.ebounds.eMaxKeV.length !== d.detchans) {
    bad('ebounds', 'EBOUNDS length differs from DETCHANS', `${d.detchans} channels`, d.ebounds.eMinKeV.length);
  }
}

/** RMF bytes: primary, MATRIX (or SPECRESP MATRIX for HDUCLAS3 FULL), EBOUNDS. */
export function writeRmf(d: RmfData): Uint8Array {
  checkRmf(d);
  const m = d.meta;
  const maxGroups = d.rows.reduce((mx, row) => Math.max(mx, row.fChan.length), 0);
  const lastChannel = d.firstChannel + d.detchans - 1;
  const matrixName = d.hduclas3 === 'FULL' ? 'SPECRESP MATRIX' : 'MATRIX';
  const common = (hduclas2: string) => [
    ...instrumentCards(m),
    { keyword: 'CHANTYPE', value: m.chantype, comment: 'channel type (PHA or PI)' },
    { keyword: 'DETCHANS', value: d.detchans, comment: 'total number of detector channels' },
    { keyword: 'HDUCLASS', value: OGIP_HDUCLASS, comment: 'format conforms to OGIP standard' },
    { keyword: 'HDUCLAS1', value: 'RESPONSE', comment: 'dataset relates to spectral response' },
    { keyword: 'HDUCLAS2', value: hduclas2 },
  ];
  return writeFits([
    { kind: 'primary', cards: primaryCards(m) },
    {
      kind: 'bintable',
      name: matrixName,
      columns: [
        { name: 'ENERG_LO', tform: '1E', unit: 'keV', data: d.energLoKeV },
        { name: 'ENERG_HI', tform: '1E', unit: 'keV', data: d.energHiKeV },
        { name: 'N_GRP', tform: maxGroups > INT16_MAX ? '1J' : '1I', data: d.rows.map((row) => row.fChan.length) },
        { name: 'F_CHAN', tform: '1PJ', tlmin: d.firstChannel, tlmax: lastChannel, data: d.rows.map((row) => row.fChan) },
        { name: 'N_CHAN', tform: '1PJ', data: d.rows.map((row) => row.nChan) },
        { name: 'MATRIX', tform: '1PE', data: d.rows.map((row) => row.matrix) },
      ],
      cards: [
        ...common('RSP_MATRIX'),
        { keyword: 'HDUCLAS3', value: d.hduclas3, comment: 'REDIST, DETECTOR or FULL' },
        { keyword: 'HDUVERS', value: RMF_MATRIX_HDUVERS, comment: 'version of the format' },
        { keyword: 'LO_THRES', value: r(d.loThres), comment: 'lower threshold on stored matrix elements' },
        ...trailerCards(m),
      ],
    },
    {
      kind: 'bintable',
      name: 'EBOUNDS',
      columns: [
        { name: 'CHANNEL', tform: '1J', tlmin: d.firstChannel, tlmax: lastChannel, data: Array.from({ length: d.detchans }, (_, i) => d.firstChannel + i) },
        { name: 'E_MIN', tform: '1E', unit: 'keV', data: d.ebounds.eMinKeV },
        { name: 'E_MAX', tform: '1E', unit: 'keV', data: d.ebounds.eMaxKeV },
      ],
      cards: [
        ...common('EBOUNDS'),
        { keyword: 'HDUVERS', value: RMF_EBOUNDS_HDUVERS, comment: 'version of the format' },
        ...trailerCards(m),
      ],
    },
  ]);
}

/**
 * The first n (≤ length) values of a cell as a new typed array, converted as Int32Array.from or
 * Float32Array.from would; typed-array cells are copied without an intermediate plain array
 * (that detour dominated reading a large matrix).
 */
/**
 * The first n values of a decoded cell as Ctor. A cell already of that type is returned as a view
 * (no copy: the rows then share memory with the file's decoded table, which halves the memory of
 * reading a large matrix); other types are converted.
 */
function head<T extends Int32Array | Float32Array>(Ctor: (new (src: ArrayLike<number>) => T) & { prototype: T }, cell: ArrayLike<number>, n: number): T {
  if (cell instanceof Ctor) return (cell as T).subarray(0, n) as T;
  return new Ctor(ArrayBuffer.isView(cell) ? (cell as Float64Array).subarray(0, n) : (Array.prototype.slice.call(cell, 0, n) as number[]));
}

export interface RmfHeaders {
  primary: FitsHeader;
  matrix: FitsHeader;
  /** null when the file has no EBOUNDS extension (data.ebounds is then empty). */
  ebounds: FitsHeader | null;
}

export function isMatrixHeader(h: FitsHeader): boolean {
  return upper(h, 'HDUCLAS1') === 'RESPONSE' && upper(h, 'HDUCLAS2') === 'RSP_MATRIX';
}

/**
 * Reads an RMF written by any tool: variable-length or fixed-width F_CHAN/N_CHAN/MATRIX, scalar
 * F_CHAN/N_CHAN, either extension name. Throws only when the layout cannot be read; bad values
 * (negative, NaN, inconsistent lengths clipped to what is present) are returned for the checks.
 */
export function readRmf(file: FitsFile): { data: RmfData; headers: RmfHeaders } {
  const hdu = findExtension(file, ['MATRIX', 'SPECRESP MATRIX'], isMatrixHeader);
  if (!hdu) {
    fitsFail({ fileName: file.fileName }, 'no MATRIX extension', {
      expected: "a BINTABLE named MATRIX or SPECRESP MATRIX, or with HDUCLAS1 = 'RESPONSE' and HDUCLAS2 = 'RSP_MATRIX'",
    });
  }
  const h = hdu.header;
  const energLo = toFloat64(requireColumn(hdu, 'ENERG_LO'), hdu, 'ENERG_LO');
  const energHi = toFloat64(requireColumn(hdu, 'ENERG_HI'), hdu, 'ENERG_HI');
  const nGrp = toFloat64(requireColumn(hdu, 'N_GRP'), hdu, 'N_GRP');
  const fChan = toCells(requireColumn(hdu, 'F_CHAN'), hdu, 'F_CHAN');
  const nChan = toCells(requireColumn(hdu, 'N_CHAN'), hdu, 'N_CHAN');
  const matrix = toCells(requireColumn(hdu, 'MATRIX'), hdu, 'MATRIX');
  const rows: RmfRow[] = [];
  for (let i = 0; i < energLo.length; i++) {
    // Fixed-width columns hold up to their repeat count; only the first N_GRP groups count.
    const g = Math.max(0, Math.min(Number.isFinite(nGrp[i]) ? nGrp[i] : 0, fChan[i].length, nChan[i].length));
    const f = head(Int32Array, fChan[i], g);
    const w = head(Int32Array, nChan[i], g);
    let total = 0;
    for (const x of w) total += Math.max(0, x);
    const mtx = head(Float32Array, matrix[i], Math.min(total, matrix[i].length));
    rows.push({ fChan: f, nChan: w, matrix: mtx });
  }
  const fCol = hdu.table!.column('F_CHAN')!;
  const firstChannel = fCol.tlmin ?? OGIP_DEFAULT_FIRST_CHANNEL;
  const primary = file.hdus[0].header;
  const ebHdu = findExtension(file, ['EBOUNDS'], (x) => upper(x, 'HDUCLAS2') === 'EBOUNDS');
  let ebounds: Ebounds = { firstChannel, eMinKeV: new Float64Array(0), eMaxKeV: new Float64Array(0) };
  if (ebHdu) {
    const ch = toFloat64(requireColumn(ebHdu, 'CHANNEL'), ebHdu, 'CHANNEL');
    ebounds = {
      firstChannel: ch.length ? ch[0] : (ebHdu.table!.column('CHANNEL')!.tlmin ?? firstChannel),
      eMinKeV: toFloat64(requireColumn(ebHdu, 'E_MIN'), ebHdu, 'E_MIN'),
      eMaxKeV: toFloat64(requireColumn(ebHdu, 'E_MAX'), ebHdu, 'E_MAX'),
    };
  }
  const detchans = h.getNumber('DETCHANS') ?? (fCol.tlmax !== undefined ? fCol.tlmax - firstChannel + 1 : ebounds.eMinKeV.length);
  const data: RmfData = {
    meta: readMeta(h, primary),
    hduclas3: upper(h, 'HDUCLAS3') as RmfData['hduclas3'],
    detchans,
    firstChannel,
    loThres: h.getNumber('LO_THRES') ?? 0,
    energLoKeV: energLo,
    energHiKeV: energHi,
    rows,
    ebounds,
  };
  return { data, headers: { primary, matrix: h, ebounds: ebHdu ? ebHdu.header : null } };
}
