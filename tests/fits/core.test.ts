/**
 * FITS core against the outside world: card syntax per FITS Standard 4.0 §4 and astropy's Card
 * parser; checksums per the FITS checksum convention and astropy's implementation; writer
 * determinism; gzip reading.
 */
import { mkdirSync, mkdtempSync, readdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { KilnInputError } from '../../generators/errors.ts';
import {
  FitsFormatError,
  encodeChecksum,
  FitsHeader,
  formatCard,
  onesComplementSum,
  parseCard,
  parseTForm,
  readFits,
  real,
  writeFits,
} from '../../generators/fits/index.ts';
import { readFitsFile, writeFileAtomic } from '../../generators/node/index.ts';
import { runAstropyChecks } from '../support/python.ts';
import { astropyRun } from './support/astropy.ts';
import { ALL_TYPES_HDUS } from './support/tables.ts';

/** The CLI's one-line message of the input error thrown by fn. */
function oneLineOf(fn: () => unknown): string {
  try {
    fn();
  } catch (e) {
    if (e instanceof KilnInputError) return e.oneLine();
    throw e;
  }
  return 'no error';
}

const tmp = mkdtempSync(join(tmpdir(), 'kiln-fits-'));

describe('cards (FITS Standard 4.0 §4.1-4.2)', () => {
  it('puts fixed-format numbers and logicals in column 30 and strings from column 11', () => {
    // FITS 4.0 §4.2.2-4.2.4: fixed format right-justifies integers, reals and T/F to column 30.
    const i = formatCard('NAXIS1', 34, 'width');
    expect(i.length).toBe(80);
    expect(i.slice(0, 10)).toBe('NAXIS1  = ');
    expect(i[29]).toBe('4');
    expect(formatCard('EXTEND', true)[29]).toBe('T');
    // §4.2.1.1: string starts with a quote in column 11, closing quote at column 20 or later.
    const s = formatCard('TUNIT1', 'keV');
    expect(s.slice(10, 20)).toBe("'keV     '");
    expect(formatCard('OBSERVER', "O'Hara").slice(10, 20)).toBe("'O''Hara '");
    // A real always has a decimal point (§4.2.4).
    expect(formatCard('EXPOSURE', real(1000)).slice(10, 30).trim()).toBe('1000.0');
  });

  it('refuses a value on a commentary card (COMMENT, HISTORY, blank keyword: text only, §4.4.2.4), which would be written as text or dropped', () => {
    for (const keyword of ['COMMENT', 'HISTORY', '']) {
      const h = new FitsHeader({ fileName: 'x.fits' });
      let err: unknown;
      try {
        h.add({ keyword, value: 3, comment: 'text' });
      } catch (e) {
        err = e;
      }
      expect(err, keyword).toBeInstanceOf(FitsFormatError);
      expect((err as FitsFormatError).message).toBe('commentary card given a value');
      expect((err as FitsFormatError).fits).toMatchObject({ fileName: 'x.fits', keyword, value: 3 });
      h.add({ keyword, comment: 'text' });
      expect(formatCard(keyword, null, 'text')).toBe(`${keyword.padEnd(8)}text`.padEnd(80));
    }
  });

  it('parses what it formats, and rejects bad syntax', () => {
    expect(parseCard(formatCard('OBSERVER', "it's / not a comment", 'c')).value).toBe("it's / not a comment");
    expect(parseCard(formatCard('LO_THRES', 1e-7)).value).toBe(1e-7);
    expect(parseCard("DATE    = '2024-01-01'".padEnd(80)).value).toBe('2024-01-01');
    expect(parseCard('HISTORY made by hand'.padEnd(80)).comment).toBe('made by hand');
    expect(parseCard('BIG     = 1.5D+03'.padEnd(80)).value).toBe(1500);
    expect(() => parseCard('lower   = 1'.padEnd(80))).toThrow(/bad keyword syntax/);
    expect(() => parseCard("NAME    = 'open".padEnd(80))).toThrow(/no closing quote/);
    expect(() => parseCard('NUM     = 1.2.3'.padEnd(80))).toThrow(/bad value syntax/);
    expect(() => parseCard("NAME    = 'x' junk".padEnd(80))).toThrow(/unexpected text after the value/);
    expect(() => formatCard('TOOLONGKEY', 1)).toThrow(/invalid keyword/);
    expect(() => formatCard('NAME', 'x'.repeat(69))).toThrow(/too long/);
    expect(() => formatCard('NAME', Number.NaN)).toThrow(FitsFormatError);
  });

  it('FitsFormatError is a KilnInputError (the CLI maps it to exit 2)', () => {
    try {
      parseCard('bad     = 1'.padEnd(80), { fileName: 'x.fits', hdu: 1 }, 7, 3040);
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(KilnInputError);
      expect((e as KilnInputError).oneLine()).toMatch(/^x\.fits: HDU 1, card 7, byte 3040: bad keyword syntax/);
    }
  });

  it('parses TFORM values (FITS 4.0 Table 18, §7.3.5)', () => {
    expect(parseTForm('1PE(40)')).toMatchObject({ type: 'E', descriptor: 'P', maxLength: 40, widthBytes: 8 });
    expect(parseTForm('PJ()'.replace('()', ''))).toMatchObject({ type: 'J', descriptor: 'P', widthBytes: 8 });
    expect(parseTForm('12A')).toMatchObject({ type: 'A', repeat: 12, widthBytes: 12 });
    expect(parseTForm('K')).toMatchObject({ repeat: 1, widthBytes: 8 });
    expect(() => parseTForm('1Z')).toThrow(/bad TFORM/);
    expect(() => parseTForm('3EE')).toThrow(/bad TFORM/);
  });

  it.runIf(runAstropyChecks)('astropy reads our cards to the same values, and we read astropy\'s', () => {
    // Reference: astropy.io.fits.Card (Debian python3-astropy).
    const ours = [formatCard('A', "O'Hara", 'quoted'), formatCard('B', 1e-7), formatCard('C', real(2)), formatCard('D', false), formatCard('E', -123456789)];
    const theirs = astropyRun<{ ours: unknown[]; images: string[] }>(
      `cards = [fits.Card.fromstring(s) for s in arg]
images = [str(fits.Card('A', "O'Hara", 'quoted')), str(fits.Card('B', 1e-7)), str(fits.Card('C', 2.0)), str(fits.Card('D', False)), str(fits.Card('E', -123456789))]
print(json.dumps({'ours': [c.value for c in cards], 'images': images}))`,
      ours,
    );
    expect(theirs.ours).toEqual(["O'Hara", 1e-7, 2, false, -123456789]);
    expect(theirs.images.map((s) => parseCard(s).value)).toEqual(["O'Hara", 1e-7, 2, false, -123456789]);
  });
});

describe('checksum convention (Seaman, Pence & Rots)', () => {
  it('sums 32-bit big-endian words with end-around carry', () => {
    // Worked by hand: 0xFFFFFFFF + 0x00000002 = 0x1_00000001 -> fold carry -> 0x00000002.
    expect(onesComplementSum(Uint8Array.of(0xff, 0xff, 0xff, 0xff, 0, 0, 0, 2))).toBe(2);
    expect(onesComplementSum(new Uint8Array(2880))).toBe(0);
  });

  it('every written HDU sums to negative zero', () => {
    const bytes = writeFits(ALL_TYPES_HDUS);
    const f = readFits(bytes);
    for (const h of f.hdus) {
      const all = bytes.subarray(h.headerOffset, h.dataOffset + Math.ceil(h.dataBytes / 2880) * 2880);
      expect(onesComplementSum(all)).toBe(0xffffffff);
      expect(h.checksum).toMatchObject({ checksum: 'ok', datasum: 'ok' });
    }
  });

  it.runIf(runAstropyChecks)('CHECKSUM encoding and DATASUM agree with astropy for the same values and bytes', () => {
    // Reference: astropy.io.fits _File checksum code (_encode_byte / _compute_checksum).
    const values = [0, 1, 0x7fffffff, 0xffffffff, 0x12345678, 0xdeadbeef];
    const enc = astropyRun<string[]>(`h = fits.PrimaryHDU()
print(json.dumps([h._char_encode(v) for v in arg]))`, values);
    expect(values.map(encodeChecksum)).toEqual(enc);
    const block = new Uint8Array(2880).map((_, i) => (i * 37 + 11) & 0xff);
    const sum = astropyRun<number>(`data = np.array(arg, dtype=np.uint8)
print(json.dumps(int(fits.PrimaryHDU()._compute_checksum(data))))`, Array.from(block));
    expect(onesComplementSum(block)).toBe(sum);
  });
});

describe('writer and file layer', () => {
  it('same input gives the same bytes (no clock, no randomness)', () => {
    const a = writeFits(ALL_TYPES_HDUS);
    const b = writeFits(structuredClone(ALL_TYPES_HDUS));
    expect(Buffer.from(a).equals(Buffer.from(b))).toBe(true);
    expect(a.length % 2880).toBe(0);
  });

  it('round-trips every column type exactly', () => {
    const f = readFits(writeFits(ALL_TYPES_HDUS));
    const t = f.hdus[1].table!;
    const input = (ALL_TYPES_HDUS[1] as { columns: { name: string; data: unknown }[] }).columns;
    for (const c of input) {
      const got = t.values.get(c.name)!;
      const norm = (v: unknown): unknown => (ArrayBuffer.isView(v) ? Array.from(v as unknown as ArrayLike<unknown>).map(norm) : Array.isArray(v) ? v.map(norm) : v);
      const want = (c.data as unknown[]).map((v) => (typeof v === 'number' && c.name.includes('E') && !c.name.includes('DOUBLE') ? Math.fround(v) : v));
      if (c.name === 'VEC3E' || c.name === 'VLA_E') expect(norm(got)).toEqual((c.data as number[][]).map((r) => r.map(Math.fround)));
      else if (c.name === 'FLOAT') expect(norm(got)).toEqual((c.data as number[]).map(Math.fround));
      else expect(norm(got)).toEqual(want);
    }
    expect(t.values.get('LONG')).toBeInstanceOf(BigInt64Array);
    expect(t.values.get('SHORT')).toBeInstanceOf(Int16Array);
    expect(t.column('VLA_J')).toMatchObject({ tlmin: 1, tlmax: 100, tform: '1PJ(2)' });
  });

  it('refuses bad writer input with a named column', () => {
    const hdus = (columns: unknown[]) => [{ kind: 'primary' as const }, { kind: 'bintable' as const, name: 'T', columns: columns as never }];
    expect(() => writeFits(hdus([{ name: 'X', tform: '1I', data: [40000] }]))).toThrow(/column X row 1/);
    expect(oneLineOf(() => writeFits(hdus([{ name: 'X', tform: '2E', data: [[1]] }])))).toMatch(/column X row 1.*exactly 2 elements/);
    expect(() => writeFits(hdus([{ name: 'X', tform: '1E', data: [1] }, { name: 'Y', tform: '1E', data: [1, 2] }]))).toThrow(/has 2 rows/);
    expect(() => writeFits([{ kind: 'primary', cards: [{ keyword: 'NAXIS', value: 3 }] }])).toThrow(/set by the writer/);
  });

  it('reads gzip-compressed files (RFC 1952 magic 1f 8b) and bounds the output size', () => {
    const bytes = writeFits(ALL_TYPES_HDUS);
    const gz = join(tmp, 'table.fits.gz');
    writeFileSync(gz, gzipSync(bytes));
    const f = readFitsFile(gz);
    expect(f.hdus[1].table!.values.get('INT')).toEqual(Int32Array.of(-2147483648, 2147483647, 5));
    expect(() => readFitsFile(gz, { maxBytes: 4000 })).toThrow(/larger than the limit/);
    writeFileSync(join(tmp, 'bad.gz'), Uint8Array.of(0x1f, 0x8b, 1, 2, 3));
    expect(() => readFitsFile(join(tmp, 'bad.gz'))).toThrow(/corrupt gzip/);
    expect(() => readFitsFile(join(tmp, 'absent.fits'))).toThrow(/absent\.fits|ENOENT/);
  });

  it('writes atomically: the target holds old or new bytes, never a part', () => {
    const dir = join(tmp, 'atomic');
    mkdirSync(dir);
    const p = join(dir, 'atomic.fits');
    writeFileAtomic(p, Uint8Array.of(1, 2, 3));
    writeFileAtomic(p, writeFits(ALL_TYPES_HDUS));
    expect(readFitsFile(p).hdus).toHaveLength(2);
    expect(readdirSync(dir)).toEqual(['atomic.fits']); // no temporary file left beside it
    expect(() => writeFileAtomic(join(tmp, 'no-such-dir', 'x.fits'), Uint8Array.of(1))).toThrow();
    // A write whose final rename fails (the target is a non-empty directory) leaves the target as it
    // was and no temporary file behind.
    const blocked = join(dir, 'blocked.fits');
    mkdirSync(blocked);
    writeFileSync(join(blocked, 'keep'), 'x');
    expect(() => writeFileAtomic(blocked, writeFits(ALL_TYPES_HDUS))).toThrow();
    expect(readdirSync(blocked)).toEqual(['keep']);
    expect(readdirSync(dir).sort()).toEqual(['atomic.fits', 'blocked.fits']);
  });

  it('reports rather than throws on checksum mismatch when asked', () => {
    const bytes = writeFits(ALL_TYPES_HDUS);
    bytes[bytes.length - 2880 + 3] ^= 0xff; // inside the data unit of the table
    expect(() => readFits(bytes)).toThrow(/DATASUM does not match/);
    const f = readFits(bytes, { verifyChecksums: 'report' });
    expect(f.hdus[1].checksum).toMatchObject({ checksum: 'bad', datasum: 'bad' });
    expect(f.hdus[0].checksum).toMatchObject({ checksum: 'ok', datasum: 'ok' });
  });
});
