/**
 * Header-data units: the mandatory keywords (FITS Standard 4.0 §4.4.1, §7.3.1), the data-unit
 * size they imply (§4.4.1.1, §7.3.2), and checksums on every HDU written.
 */
import { decodeBinTable, planBinTable, type BinTable, type ColumnInput } from './bintable.ts';
import { CHECKSUM_PLACEHOLDER, addSums, complement, encodeChecksum, NEGATIVE_ZERO, onesComplementSum, type ChecksumStatus } from './checksum.ts';
import { fitsFail, type FitsContext } from './errors.ts';
import { BLOCK_BYTES, FitsHeader, paddedLength, type CardInput } from './header.ts';

export type HduType = 'primary' | 'bintable' | 'image' | 'table' | 'other';

export interface FitsHdu {
  /** 0-based position in the file. */
  index: number;
  /** EXTNAME, or "PRIMARY" for the primary HDU without one. */
  name: string;
  type: HduType;
  header: FitsHeader;
  headerOffset: number;
  headerBytes: number;
  dataOffset: number;
  /** Data unit size without padding (NAXIS1*NAXIS2 + PCOUNT for a BINTABLE). */
  dataBytes: number;
  /** Decoded table for BINTABLE extensions, else null. */
  table: BinTable | null;
  checksum: ChecksumStatus;
}

export interface PrimaryHduInput {
  kind: 'primary';
  cards?: CardInput[];
}

export interface BinTableHduInput {
  kind: 'bintable';
  /** EXTNAME. */
  name: string;
  columns: ColumnInput[];
  /** Extra cards after the structural ones, in order (COMMENT/HISTORY allowed). */
  cards?: CardInput[];
}

export type HduInput = PrimaryHduInput | BinTableHduInput;

/** Keywords the writer owns; callers may not set them (they define the structure). */
const RESERVED = /^(SIMPLE|XTENSION|BITPIX|NAXIS[0-9]*|EXTEND|PCOUNT|GCOUNT|TFIELDS|THEAP|T(TYPE|FORM|UNIT|LMIN|LMAX|SCAL|ZERO|NULL|DIM)[0-9]+|EXTNAME|CHECKSUM|DATASUM|END)$/;
/** BITPIX values allowed by FITS 4.0 Table 8. */
const BITPIX_VALUES = new Set([8, 16, 32, 64, -32, -64]);
/** Upper bound of NAXIS and TFIELDS (FITS 4.0 §4.4.1.1, §7.3.1). */
const MAX_AXES = 999;

function checkUserCards(cards: CardInput[] | undefined, ctx: FitsContext): CardInput[] {
  for (const c of cards ?? []) {
    if (RESERVED.test(c.keyword)) fitsFail(ctx, `keyword ${c.keyword} is set by the writer`, { keyword: c.keyword, expected: 'a non-structural keyword' });
  }
  return cards ?? [];
}

/** Sets CHECKSUM and DATASUM (placed last) so that the HDU sums to negative zero; returns the header bytes. */
function sealHeader(header: FitsHeader, paddedData: Uint8Array): Uint8Array {
  const dataSum = onesComplementSum(paddedData);
  header.set('CHECKSUM', CHECKSUM_PLACEHOLDER, 'HDU checksum');
  header.set('DATASUM', String(dataSum), 'data unit checksum');
  const hduSum = addSums(onesComplementSum(header.toBytes()), dataSum);
  header.set('CHECKSUM', encodeChecksum(complement(hduSum)), 'HDU checksum');
  return header.toBytes();
}

/** One encoded HDU as its header bytes and its zero-padded data unit. */
export interface EncodedHduParts {
  header: Uint8Array;
  data: Uint8Array;
}

/**
 * One HDU planned before any data byte is written: its header (all cards but the checksum
 * values), the exact sizes, and a function that fills a zero-filled data unit. Lets a file writer
 * allocate the whole file once and encode every table straight into it, so a large matrix is
 * held once in its in-memory form and once as bytes, never more.
 */
export interface HduPlan {
  header: FitsHeader;
  /** Header bytes including CHECKSUM/DATASUM and END, padded to whole blocks. */
  headerBytes: number;
  /** Data unit bytes, padded to whole blocks. */
  dataBytes: number;
  fill(data: Uint8Array): void;
}

export function planHdu(input: HduInput, index: number): HduPlan {
  const ctx: FitsContext = { hdu: index, hduName: input.kind === 'bintable' ? input.name : undefined };
  const h = new FitsHeader(ctx);
  let dataBytes = 0;
  let fill: (data: Uint8Array) => void = () => {};
  if (input.kind === 'primary') {
    if (index !== 0) fitsFail(ctx, 'a primary HDU can only come first', { expected: 'BINTABLE extensions after the primary HDU' });
    h.set('SIMPLE', true, 'conforms to FITS standard');
    h.set('BITPIX', 8, 'array data type');
    h.set('NAXIS', 0, 'no primary data array');
    h.set('EXTEND', true, 'extensions may follow');
    for (const c of checkUserCards(input.cards, ctx)) h.add(c);
  } else {
    if (index === 0) fitsFail(ctx, 'the first HDU must be the primary HDU', { expected: "{ kind: 'primary' } first" });
    const table = planBinTable(input.columns, ctx);
    h.set('XTENSION', 'BINTABLE', 'binary table extension');
    h.set('BITPIX', 8, '8-bit bytes');
    h.set('NAXIS', 2, '2-dimensional binary table');
    for (const c of table.cards) h.add(c);
    h.set('EXTNAME', input.name, 'name of this extension');
    for (const c of checkUserCards(input.cards, ctx)) h.add(c);
    dataBytes = paddedLength(table.dataBytes);
    fill = table.fill;
  }
  // The checksum cards take their final places now; sealing only changes their values.
  h.set('CHECKSUM', CHECKSUM_PLACEHOLDER, 'HDU checksum');
  h.set('DATASUM', '0', 'data unit checksum');
  return { header: h, headerBytes: h.toBytes().length, dataBytes, fill };
}

/** Writes a planned HDU into `out` at `at` (out zero-filled); returns the offset after it. */
export function writePlannedHdu(plan: HduPlan, out: Uint8Array, at: number): number {
  const data = out.subarray(at + plan.headerBytes, at + plan.headerBytes + plan.dataBytes);
  plan.fill(data);
  const header = sealHeader(plan.header, data);
  if (header.length !== plan.headerBytes) throw new Error(`FITS writer: header of ${header.length} bytes, planned ${plan.headerBytes}`);
  out.set(header, at);
  return at + plan.headerBytes + plan.dataBytes;
}

/** Encodes one HDU with CHECKSUM/DATASUM, header and padded data kept apart. */
export function encodeHduParts(input: HduInput, index: number): EncodedHduParts {
  const plan = planHdu(input, index);
  const out = new Uint8Array(plan.headerBytes + plan.dataBytes);
  writePlannedHdu(plan, out, 0);
  return { header: out.subarray(0, plan.headerBytes), data: out.subarray(plan.headerBytes) };
}

/** Encodes one HDU (header, data, zero padding) with CHECKSUM/DATASUM. */
export function encodeHdu(input: HduInput, index: number): Uint8Array {
  const { header, data } = encodeHduParts(input, index);
  const out = new Uint8Array(header.length + data.length);
  out.set(header, 0);
  out.set(data, header.length);
  return out;
}

/** Checks CHECKSUM/DATASUM of one HDU's bytes (header and padded data). */
export function checkHduSums(header: Uint8Array, paddedData: Uint8Array, parsed: FitsHeader): ChecksumStatus {
  const dataSum = onesComplementSum(paddedData);
  const hduSum = addSums(onesComplementSum(header), dataSum);
  const storedCk = parsed.get('CHECKSUM');
  const storedDs = parsed.get('DATASUM');
  const storedDatasum = storedDs === undefined || storedDs === null ? undefined : String(storedDs).trim();
  return {
    checksum: storedCk === undefined ? 'absent' : hduSum === NEGATIVE_ZERO ? 'ok' : 'bad',
    datasum: storedDatasum === undefined ? 'absent' : /^[0-9]+$/.test(storedDatasum) && Number(storedDatasum) === dataSum ? 'ok' : 'bad',
    hduSum,
    dataSum,
    storedDatasum,
  };
}

/** Requires `keyword` to be card number `n` (1-based) with an integer value. */
function mandatoryInt(h: FitsHeader, keyword: string, n: number, expected: string): number {
  const c = h.cards[n - 1];
  if (!c || c.commentary || c.keyword !== keyword) {
    fitsFail(h.ctx, `mandatory keyword ${keyword} missing or out of order`, {
      card: n,
      byteOffset: h.byteOffset + (n - 1) * 80,
      value: c ? c.keyword : undefined,
      expected: `${keyword} as card ${n} (FITS 4.0 §4.4.1)`,
    });
  }
  if (typeof c.value !== 'number' || !Number.isInteger(c.value)) {
    fitsFail(h.ctx, `${keyword} must be an integer`, { card: n, keyword, value: c.value, expected });
  }
  return c.value;
}

export interface HduLayout {
  type: HduType;
  /** Data unit size in bytes, unpadded. */
  dataBytes: number;
}

/**
 * Checks the mandatory keywords and computes the data size, refusing sizes beyond `available`
 * bytes (before anything is allocated).
 */
export function hduLayout(h: FitsHeader, index: number, dataOffset: number, available: number): HduLayout {
  const ctx = h.ctx;
  const first = h.cards[0];
  let type: HduType;
  if (index === 0) {
    if (!first || first.keyword !== 'SIMPLE' || first.value !== true) {
      fitsFail(ctx, 'not a FITS file: the first card must be SIMPLE = T', { card: 1, byteOffset: 0, value: first?.keyword === 'SIMPLE' ? first.value : first?.keyword, expected: "'SIMPLE  =                    T'" });
    }
    type = 'primary';
  } else {
    if (!first || first.keyword !== 'XTENSION' || typeof first.value !== 'string') {
      fitsFail(ctx, 'extension header must start with XTENSION', { card: 1, byteOffset: h.byteOffset, value: first?.keyword, expected: "XTENSION = 'BINTABLE' (or another extension type) as card 1" });
    }
    const x = (first.value as string).trim();
    type = x === 'BINTABLE' ? 'bintable' : x === 'IMAGE' ? 'image' : x === 'TABLE' ? 'table' : 'other';
  }
  const bitpix = mandatoryInt(h, 'BITPIX', 2, 'one of 8, 16, 32, 64, -32, -64');
  if (!BITPIX_VALUES.has(bitpix)) fitsFail(ctx, 'BITPIX not allowed', { card: 2, keyword: 'BITPIX', value: bitpix, expected: 'one of 8, 16, 32, 64, -32, -64 (FITS 4.0 Table 8)' });
  const naxis = mandatoryInt(h, 'NAXIS', 3, `0 to ${MAX_AXES}`);
  if (naxis < 0 || naxis > MAX_AXES) fitsFail(ctx, 'NAXIS out of range', { card: 3, keyword: 'NAXIS', value: naxis, expected: `0 to ${MAX_AXES}` });
  const axes: number[] = [];
  for (let i = 1; i <= naxis; i++) {
    const v = mandatoryInt(h, `NAXIS${i}`, 3 + i, 'a non-negative integer');
    if (v < 0) fitsFail(ctx, `NAXIS${i} is negative`, { card: 3 + i, keyword: `NAXIS${i}`, value: v, expected: 'a non-negative integer' });
    axes.push(v);
  }
  let pcount = 0;
  let gcount = 1;
  if (index > 0) {
    pcount = mandatoryInt(h, 'PCOUNT', 4 + naxis, 'a non-negative integer');
    gcount = mandatoryInt(h, 'GCOUNT', 5 + naxis, 'a positive integer');
    if (pcount < 0) fitsFail(ctx, 'PCOUNT is negative', { keyword: 'PCOUNT', card: 4 + naxis, value: pcount, expected: 'the heap size in bytes, >= 0' });
  } else if (naxis > 0 && axes[0] === 0 && h.getBool('GROUPS') === true) {
    // Random groups (FITS 4.0 §6): size = |BITPIX|/8 * GCOUNT * (PCOUNT + NAXIS2*...*NAXISm).
    pcount = h.getInt('PCOUNT') ?? 0;
    gcount = h.getInt('GCOUNT') ?? 1;
    axes[0] = 1;
  }
  if (type === 'bintable') {
    if (bitpix !== 8) fitsFail(ctx, 'BINTABLE needs BITPIX = 8', { card: 2, keyword: 'BITPIX', value: bitpix, expected: '8 (FITS 4.0 §7.3.1)' });
    if (naxis !== 2) fitsFail(ctx, 'BINTABLE needs NAXIS = 2', { card: 3, keyword: 'NAXIS', value: naxis, expected: '2 (FITS 4.0 §7.3.1)' });
    if (gcount !== 1) fitsFail(ctx, 'BINTABLE needs GCOUNT = 1', { card: 7, keyword: 'GCOUNT', value: gcount, expected: '1 (FITS 4.0 §7.3.1)' });
    mandatoryInt(h, 'TFIELDS', 8, `0 to ${MAX_AXES}`);
  }
  // Multiply with a bound so absurd sizes are refused before any arithmetic overflows.
  let n = 1;
  const product = naxis === 0 ? 0 : axes.reduce((p, a) => p * a, 1);
  if (naxis > 0 && !Number.isSafeInteger(product)) fitsFail(ctx, 'data unit size overflows', { keyword: 'NAXISn', value: axes, expected: 'a data unit no larger than the file' });
  n = naxis === 0 ? 0 : (Math.abs(bitpix) / 8) * gcount * (pcount + product);
  if (n > available) {
    const detail = type === 'bintable' ? `NAXIS1 = ${axes[0]} bytes x NAXIS2 = ${axes[1]} rows + PCOUNT = ${pcount}` : `|BITPIX|/8 x GCOUNT x (PCOUNT + NAXIS1 x ... x NAXIS${naxis})`;
    fitsFail(ctx, `data unit runs past the end of the file: ${detail} = ${n} bytes, but only ${available} bytes follow the header`, {
      byteOffset: dataOffset,
      expected: `a file of at least ${dataOffset + paddedLength(n)} bytes`,
    });
  }
  return { type, dataBytes: n };
}

/** Parses one HDU at `offset`; returns it and the offset of the next. */
export function readHdu(bytes: Uint8Array, offset: number, index: number, fileName: string | undefined): { hdu: FitsHdu; next: number } {
  const { header, byteLength } = FitsHeader.parse(bytes, offset, { fileName, hdu: index });
  const dataOffset = offset + byteLength;
  const layout = hduLayout(header, index, dataOffset, bytes.length - dataOffset);
  const padded = paddedLength(layout.dataBytes);
  if (dataOffset + padded > bytes.length) {
    fitsFail(header.ctx, `file ends inside the padding of the data unit (${bytes.length - dataOffset - layout.dataBytes} of ${padded - layout.dataBytes} padding bytes present)`, {
      byteOffset: bytes.length,
      expected: `the data unit padded to a multiple of ${BLOCK_BYTES} bytes, ending at byte ${dataOffset + padded}`,
    });
  }
  const data = bytes.subarray(dataOffset, dataOffset + layout.dataBytes);
  const table = layout.type === 'bintable' ? decodeBinTable(header, data, dataOffset, bytes.length) : null;
  const checksum = checkHduSums(bytes.subarray(offset, dataOffset), bytes.subarray(dataOffset, dataOffset + padded), header);
  const hdu: FitsHdu = {
    index,
    name: header.getString('EXTNAME') ?? (index === 0 ? 'PRIMARY' : ''),
    type: layout.type,
    header,
    headerOffset: offset,
    headerBytes: byteLength,
    dataOffset,
    dataBytes: layout.dataBytes,
    table,
    checksum,
  };
  return { hdu, next: dataOffset + padded };
}
