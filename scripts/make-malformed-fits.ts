/**
 * Writes the corpus of malformed FITS files in tests/fixtures/fits/malformed/: each file is a
 * small valid RMF (invented test values, no real instrument) with one defect against FITS
 * Standard 4.0 or the checksum convention. tests/fits/malformed.test.ts expects each one to be
 * refused with its own message.
 *
 *   npx tsx scripts/make-malformed-fits.ts
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { readFits, type FitsFile } from '../generators/fits/index.ts';
import { writeRmf } from '../generators/ogip/index.ts';
import type { RmfData } from '../generators/response/types.ts';

const CARD = 80;
const BLOCK = 2880;

/** A tiny RMF: 4 energy bins, 6 channels, invented values. */
export function baseRmf(): Uint8Array {
  const nE = 4;
  const det = 6;
  const data: RmfData = {
    meta: { telescop: 'TESTSAT', instrume: 'TESTCAM', filter: 'NONE', chantype: 'PI', date: '2024-01-01', creator: 'make-malformed-fits', history: ['invented values for malformed-file tests'] },
    hduclas3: 'REDIST',
    detchans: det,
    firstChannel: 1,
    loThres: 0,
    energLoKeV: Float64Array.from({ length: nE }, (_, i) => 1 + i),
    energHiKeV: Float64Array.from({ length: nE }, (_, i) => 2 + i),
    rows: Array.from({ length: nE }, (_, i) => ({ fChan: Int32Array.of(1 + i), nChan: Int32Array.of(2), matrix: Float32Array.of(0.25, 0.75) })),
    ebounds: { firstChannel: 1, eMinKeV: Float64Array.from({ length: det }, (_, i) => i), eMaxKeV: Float64Array.from({ length: det }, (_, i) => i + 1) },
  };
  return writeRmf(data);
}

function cardOffset(file: FitsFile, hdu: number, keyword: string): number {
  const h = file.hdus[hdu];
  const i = h.header.cards.findIndex((c) => c.keyword === keyword);
  if (i < 0) throw new Error(`no ${keyword} in HDU ${hdu}`);
  return h.headerOffset + i * CARD;
}

function putAscii(b: Uint8Array, at: number, s: string): void {
  for (let i = 0; i < s.length; i++) b[at + i] = s.charCodeAt(i);
}

function setCard(b: Uint8Array, at: number, text: string): void {
  putAscii(b, at, text.padEnd(CARD, ' ').slice(0, CARD));
}

/** Offset of the END card of an HDU's header. */
function endOffset(file: FitsFile, hdu: number): number {
  return file.hdus[hdu].headerOffset + file.hdus[hdu].header.cards.length * CARD;
}

export interface MalformedCase {
  name: string;
  description: string;
  bytes: Uint8Array;
}

export function malformedCases(): MalformedCase[] {
  const base = baseRmf();
  const file = readFits(base);
  const matrix = file.hdus[1];
  const copy = () => base.slice();
  const cases: MalformedCase[] = [];
  const add = (name: string, description: string, bytes: Uint8Array) => cases.push({ name, description, bytes });

  add('empty.fits', 'zero bytes', new Uint8Array(0));
  add('truncated-header.fits', 'cut in the middle of the MATRIX header', base.slice(0, matrix.headerOffset + 1000));
  add('truncated-data.fits', 'cut in the middle of the MATRIX data unit', base.slice(0, matrix.dataOffset + 40));
  add('truncated-padding.fits', 'last block cut short: padding of the EBOUNDS data missing', base.slice(0, base.length - 100));
  {
    // Primary HDU alone, END blanked: the header never ends.
    const b = base.slice(0, BLOCK);
    setCard(b, endOffset(file, 0), '');
    add('missing-end.fits', 'primary header without END card', b);
  }
  {
    const b = copy();
    putAscii(b, cardOffset(file, 1, 'TELESCOP'), 'telescop');
    add('lowercase-keyword.fits', 'keyword in lower case', b);
  }
  {
    const b = copy();
    setCard(b, cardOffset(file, 1, 'TTYPE1'), "TTYPE1  = 'ENERG_LO ");
    add('unterminated-string.fits', 'string value without closing quote', b);
  }
  {
    const b = copy();
    setCard(b, cardOffset(file, 1, 'DETCHANS'), 'DETCHANS=                 6X6 / bad number');
    add('bad-value.fits', 'value that is no string, logical or number', b);
  }
  {
    const b = copy();
    b[cardOffset(file, 1, 'CREATOR') + 40] = 0xe9;
    add('non-ascii-header.fits', 'byte 0xE9 inside a header card', b);
  }
  {
    const b = copy();
    setCard(b, cardOffset(file, 0, 'SIMPLE'), 'SIMPLE  =                    F');
    add('not-simple.fits', 'first card SIMPLE = F', b);
  }
  {
    const b = copy();
    setCard(b, cardOffset(file, 0, 'BITPIX'), 'BITPIX  =                   12');
    add('bad-bitpix.fits', 'BITPIX = 12', b);
  }
  {
    const b = copy();
    const a = cardOffset(file, 1, 'NAXIS1');
    const n1 = b.slice(a, a + CARD);
    b.copyWithin(a, a + CARD, a + 2 * CARD);
    b.set(n1, a + CARD);
    add('naxis-order.fits', 'NAXIS2 before NAXIS1', b);
  }
  {
    const b = copy();
    setCard(b, cardOffset(file, 1, 'NAXIS1'), `NAXIS1  = ${String(matrix.table!.rowBytes - 4).padStart(20)}`);
    add('naxis1-width.fits', 'NAXIS1 smaller than the sum of the TFORM widths', b);
  }
  {
    const b = copy();
    setCard(b, cardOffset(file, 1, 'NAXIS2'), `NAXIS2  = ${'1000000'.padStart(20)}`);
    add('too-many-rows.fits', 'NAXIS2 claims a million rows', b);
  }
  {
    const b = copy();
    setCard(b, cardOffset(file, 1, 'PCOUNT'), `PCOUNT  = ${'0'.padStart(20)}`);
    add('pcount-zero.fits', 'PCOUNT = 0 while the table has variable-length arrays', b);
  }
  {
    const b = copy();
    setCard(b, cardOffset(file, 1, 'CREATOR'), `THEAP   = ${'8'.padStart(20)}`);
    add('theap-inside-table.fits', 'THEAP points inside the table', b);
  }
  {
    const b = copy();
    // MATRIX is column 6; its descriptor offset field in row 2.
    const col = matrix.table!.column('MATRIX')!;
    const at = matrix.dataOffset + matrix.table!.rowBytes + col.offsetBytes + 4;
    new DataView(b.buffer).setInt32(at, 0x7fff0000);
    add('heap-offset.fits', 'MATRIX descriptor of row 2 points far past the heap', b);
  }
  {
    const b = copy();
    const col = matrix.table!.column('F_CHAN')!;
    const at = matrix.dataOffset + 2 * matrix.table!.rowBytes + col.offsetBytes;
    new DataView(b.buffer).setInt32(at, -5);
    add('heap-negative-count.fits', 'F_CHAN descriptor of row 3 has a negative count', b);
  }
  {
    const b = copy();
    setCard(b, cardOffset(file, 1, 'TFORM3'), "TFORM3  = '1Z      '");
    add('bad-tform.fits', 'TFORM3 = 1Z, no such type', b);
  }
  {
    const b = copy();
    putAscii(b, cardOffset(file, 1, 'TFORM2'), 'TFORMX  ');
    add('missing-tform.fits', 'TFORM2 missing', b);
  }
  {
    const b = copy();
    setCard(b, endOffset(file, 0) + CARD, 'JUNK    = 1');
    add('text-after-end.fits', 'a value card after END in the same block', b);
  }
  {
    const b = new Uint8Array(base.length + BLOCK);
    b.set(base, 0);
    b.set(base.subarray(0, BLOCK), base.length);
    add('second-primary.fits', 'a second SIMPLE header after the last extension', b);
  }
  {
    const b = copy();
    // Flip one bit of the first ENERG_LO value: structure intact, DATASUM wrong.
    b[matrix.dataOffset + 1] ^= 0x01;
    add('datasum-mismatch.fits', 'one data bit flipped', b);
  }
  {
    const b = copy();
    // Change a comment character of the primary header: CHECKSUM wrong, DATASUM still right.
    const at = cardOffset(file, 0, 'TELESCOP') + 40;
    b[at] = b[at] === 0x58 ? 0x59 : 0x58;
    add('checksum-mismatch.fits', 'one header character changed', b);
  }
  return cases;
}

function main(): void {
  const here = dirname(fileURLToPath(import.meta.url));
  const outDir = join(here, '..', 'tests', 'fixtures', 'fits', 'malformed');
  mkdirSync(outDir, { recursive: true });
  const lines = ['# Malformed FITS corpus', '', 'Written by `npx tsx scripts/make-malformed-fits.ts`; invented values. One defect per file:', ''];
  for (const c of malformedCases()) {
    writeFileSync(join(outDir, c.name), c.bytes);
    lines.push(`- \`${c.name}\`: ${c.description}`);
  }
  writeFileSync(join(outDir, 'README.md'), lines.join('\n') + '\n');
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) main();
