/**
 * FITS checksum convention (Seaman, Pence & Rots, registered FITS convention, 2002/2012 — the
 * "Checksum" convention of the FITS registry): DATASUM is the 32-bit ones'-complement sum of the
 * data unit, as an unsigned decimal string; CHECKSUM is a 16-character ASCII encoding of the
 * complement of the HDU sum, so that the whole HDU sums to negative zero (0xFFFFFFFF).
 */

const TWO_16 = 0x10000;
const TWO_32 = 0x100000000;
/** Ones'-complement negative zero: the sum of an HDU with a correct CHECKSUM. */
export const NEGATIVE_ZERO = 0xffffffff;
/** Placeholder written before the sum is known; '0' is the encoding's zero offset. */
export const CHECKSUM_PLACEHOLDER = '0000000000000000';

/**
 * Ones'-complement sum of big-endian 32-bit words of `bytes` (length a multiple of 4), continuing
 * from `initial`. The two 16-bit halves are summed separately and the carries folded at the end,
 * as in the convention's reference code.
 */
export function onesComplementSum(bytes: Uint8Array, initial = 0): number {
  if (bytes.length % 4 !== 0) throw new RangeError('checksum input must be a multiple of 4 bytes');
  let hi = Math.floor(initial / TWO_16);
  let lo = initial % TWO_16;
  // Doubles hold integers exactly to 2^53: 16-bit partial sums cannot overflow for any real file.
  for (let i = 0; i < bytes.length; i += 4) {
    hi += (bytes[i] << 8) | bytes[i + 1];
    lo += (bytes[i + 2] << 8) | bytes[i + 3];
  }
  for (;;) {
    const hiCarry = Math.floor(hi / TWO_16);
    const loCarry = Math.floor(lo / TWO_16);
    if (hiCarry === 0 && loCarry === 0) break;
    hi = (hi % TWO_16) + loCarry;
    lo = (lo % TWO_16) + hiCarry;
  }
  return hi * TWO_16 + lo;
}

/** Adds two ones'-complement 32-bit sums. */
export function addSums(a: number, b: number): number {
  let s = a + b;
  if (s >= TWO_32) s = s - TWO_32 + 1;
  return s;
}

/** ASCII punctuation excluded from the encoding (convention, "ASCII encoding" section). */
const EXCLUDE = [0x3a, 0x3b, 0x3c, 0x3d, 0x3e, 0x3f, 0x40, 0x5b, 0x5c, 0x5d, 0x5e, 0x5f, 0x60];
/** Offset of the encoding: ASCII '0'. */
const ENCODE_OFFSET = 0x30;

/** 16-character encoding of a 32-bit value (the convention's char_encode, with its final 1-byte rotation). */
export function encodeChecksum(value: number): string {
  const ascii = new Array<number>(16);
  for (let i = 0; i < 4; i++) {
    const byte = (value >>> ((3 - i) * 8)) & 0xff;
    const quotient = Math.floor(byte / 4) + ENCODE_OFFSET;
    const remainder = byte % 4;
    const ch = [quotient + remainder, quotient, quotient, quotient];
    for (let check = true; check; ) {
      check = false;
      for (const ex of EXCLUDE) {
        for (let j = 0; j < 4; j += 2) {
          if (ch[j] === ex || ch[j + 1] === ex) {
            ch[j]++;
            ch[j + 1]--;
            check = true;
          }
        }
      }
    }
    for (let j = 0; j < 4; j++) ascii[4 * j + i] = ch[j];
  }
  let s = '';
  for (let i = 0; i < 16; i++) s += String.fromCharCode(ascii[(i + 15) % 16]);
  return s;
}

/** Complement of a ones'-complement sum (what CHECKSUM encodes). */
export function complement(sum: number): number {
  return NEGATIVE_ZERO - sum;
}

export type ChecksumState = 'ok' | 'bad' | 'absent';

export interface ChecksumStatus {
  /** CHECKSUM: whole HDU sums to negative zero. */
  checksum: ChecksumState;
  /** DATASUM: stored decimal string equals the data unit's sum. */
  datasum: ChecksumState;
  /** Sums as computed, for messages. */
  hduSum: number;
  dataSum: number;
  storedDatasum?: string;
}
