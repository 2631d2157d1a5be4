/** Whole FITS files: write a list of HDUs, read and check every HDU of a byte array. */
import type { ChecksumStatus } from './checksum.ts';
import { fitsFail } from './errors.ts';
import { planHdu, readHdu, writePlannedHdu, type FitsHdu, type HduInput } from './hdu.ts';
import { BLOCK_BYTES } from './header.ts';

export interface FitsFile {
  fileName?: string;
  byteLength: number;
  hdus: FitsHdu[];
}

/** What to do when CHECKSUM or DATASUM do not match: throw, or only record it in hdu.checksum. */
export type ChecksumPolicy = 'error' | 'report';

export interface ReadFitsOptions {
  /** Name used in error messages. */
  fileName?: string;
  /** Default 'error'. */
  verifyChecksums?: ChecksumPolicy;
}

/** Concatenates the HDUs (primary first); output depends only on the input. */
export function writeFits(hdus: HduInput[]): Uint8Array {
  // Plan every HDU, allocate the file once, encode each table straight into it.
  const plans = hdus.map((h, i) => planHdu(h, i));
  const out = new Uint8Array(plans.reduce((s, p) => s + p.headerBytes + p.dataBytes, 0));
  let at = 0;
  for (const p of plans) at = writePlannedHdu(p, out, at);
  return out;
}

/** Parses a FITS file strictly; see FitsFormatError for what is refused. */
export function readFits(bytes: Uint8Array, opts: ReadFitsOptions = {}): FitsFile {
  const fileName = opts.fileName;
  if (bytes.length === 0) fitsFail({ fileName }, 'empty file', { expected: 'a FITS file of whole 2880-byte blocks' });
  const hdus: FitsHdu[] = [];
  let offset = 0;
  while (offset < bytes.length) {
    if (hdus.length > 0 && isAllZero(bytes, offset)) break; // zero fill after the last HDU carries nothing
    const { hdu, next } = readHdu(bytes, offset, hdus.length, fileName);
    hdus.push(hdu);
    offset = next;
  }
  if (bytes.length % BLOCK_BYTES !== 0) {
    fitsFail({ fileName }, `file size ${bytes.length} is not a multiple of ${BLOCK_BYTES}`, { byteOffset: offset, expected: 'whole 2880-byte blocks (FITS 4.0 §3.1)' });
  }
  const file: FitsFile = { fileName, byteLength: bytes.length, hdus };
  if ((opts.verifyChecksums ?? 'error') === 'error') assertChecksums(file);
  return file;
}

function isAllZero(bytes: Uint8Array, from: number): boolean {
  for (let i = from; i < bytes.length; i++) if (bytes[i] !== 0) return false;
  return true;
}

/** CHECKSUM/DATASUM status of every HDU (as computed while reading). */
export function verifyChecksums(file: FitsFile): { index: number; name: string; status: ChecksumStatus }[] {
  return file.hdus.map((h) => ({ index: h.index, name: h.name, status: h.checksum }));
}

/** Throws on the first HDU whose CHECKSUM or DATASUM does not match. */
export function assertChecksums(file: FitsFile): void {
  for (const h of file.hdus) {
    const s = h.checksum;
    if (s.datasum === 'bad') {
      fitsFail(h.header.ctx, 'DATASUM does not match the data unit', {
        card: h.header.cardNumber('DATASUM'),
        keyword: 'DATASUM',
        value: s.storedDatasum,
        expected: `'${s.dataSum}' (ones'-complement sum of the data unit)`,
      });
    }
    if (s.checksum === 'bad') {
      fitsFail(h.header.ctx, `CHECKSUM does not match: the HDU sums to ${s.hduSum}`, {
        card: h.header.cardNumber('CHECKSUM'),
        keyword: 'CHECKSUM',
        expected: `an HDU sum of negative zero (${0xffffffff})`,
      });
    }
  }
}

/** The first HDU whose EXTNAME matches (case-insensitive, trailing blanks ignored). */
export function findHdu(file: FitsFile, extname: string): FitsHdu | undefined {
  const want = extname.trim().toUpperCase();
  return file.hdus.find((h) => h.name.trim().toUpperCase() === want);
}
