/**
 * The malformed-file corpus (tests/fixtures/fits/malformed/, made by
 * scripts/make-malformed-fits.ts): each file breaks one rule of FITS Standard 4.0 or of the
 * checksum convention and must be refused with a message naming the place and the rule.
 */
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { FitsFormatError, readFits } from '../../generators/fits/index.ts';
import { malformedCases } from '../../scripts/make-malformed-fits.ts';

const DIR = join(import.meta.dirname, '..', 'fixtures', 'fits', 'malformed');

/** File → what the message must say; each pattern names the rule (and the source of the rule). */
const EXPECT: Record<string, RegExp> = {
  'empty.fits': /empty file/, // §3.1: a file is a sequence of 2880-byte blocks
  'truncated-header.fits': /HDU 1, byte 2880: missing END card: file ends inside a header block \(1000 of 2880 bytes\)/, // §3.3.1
  'truncated-data.fits': /HDU 1 \(MATRIX\), byte 8640: data unit runs past the end of the file: .*NAXIS2 = 4 rows.* only 40 bytes follow/, // §7.3.2
  'truncated-padding.fits': /HDU 2 \(EBOUNDS\).*file ends inside the padding of the data unit/, // §3.3.2
  'missing-end.fits': /HDU 0 \(primary\), byte 2880: missing END card: file ends before the END card/, // §4.4.1
  'lowercase-keyword.fits': /card 26, byte 4880: bad keyword syntax \(got "telescop"/, // §4.1.2.1
  'unterminated-string.fits': /card 9, TTYPE1, byte 3520: string value has no closing quote/, // §4.2.1.1
  'bad-value.fits': /DETCHANS.*bad value syntax \(got "6X6"/, // §4.2
  'non-ascii-header.fits': /non-ASCII byte 0xe9 in column 41/, // §4.1.1
  'not-simple.fits': /HDU 0 \(primary\), card 1, byte 0: not a FITS file: the first card must be SIMPLE = T \(got false/, // §4.4.1.1
  'bad-bitpix.fits': /card 2, BITPIX: BITPIX not allowed \(got 12/, // Table 8
  'naxis-order.fits': /card 4, byte 3120: mandatory keyword NAXIS1 missing or out of order \(got "NAXIS2"/, // §7.3.1 Table 17
  'naxis1-width.fits': /NAXIS1: column widths do not add up to the row length \(got 30; expected NAXIS1 = 34/, // §7.3.1
  'too-many-rows.fits': /data unit runs past the end of the file: NAXIS1 = 34 bytes x NAXIS2 = 1000000 rows/, // §7.3.2
  'pcount-zero.fits': /heap descriptor out of range in column F_CHAN row 1.*heap size 0 bytes/, // §7.3.5
  'theap-inside-table.fits': /THEAP is inconsistent with the table size \(got 8; expected NAXIS1\*NAXIS2 = 136 <= THEAP/, // §7.3.5
  'heap-offset.fits': /heap descriptor out of range in column MATRIX row 2 \(got \{"count":2,"offset":2147418112\}/, // §7.3.5
  'heap-negative-count.fits': /heap descriptor out of range in column F_CHAN row 3 \(got \{"count":-5/, // §7.3.5
  'bad-tform.fits': /TFORM3: bad TFORM: unrecognised form \(got "1Z"/, // Table 18
  'missing-tform.fits': /TFORM2: missing TFORM2/, // §7.3.1 mandatory TFORMn
  'text-after-end.fits': /HDU 0 \(primary\), card 12, byte 880: text after the END card/, // §4.4.1
  'second-primary.fits': /HDU 3, card 1, byte 17280: extension header must start with XTENSION \(got "SIMPLE"/, // §3.4
  'datasum-mismatch.fits': /HDU 1 \(MATRIX\), card \d+, DATASUM: DATASUM does not match the data unit/, // checksum convention
  'checksum-mismatch.fits': /HDU 0 \(primary\), card \d+, CHECKSUM: CHECKSUM does not match/, // checksum convention
};

describe('malformed FITS corpus', () => {
  const files = readdirSync(DIR).filter((f) => f.endsWith('.fits')).sort();

  it('has at least 15 files, each with an expectation', () => {
    expect(files.length).toBeGreaterThanOrEqual(15);
    expect(files).toEqual(Object.keys(EXPECT).sort());
  });

  it('committed files are what the committed script makes', () => {
    for (const c of malformedCases()) {
      expect(Buffer.from(readFileSync(join(DIR, c.name))).equals(Buffer.from(c.bytes)), c.name).toBe(true);
    }
  });

  for (const [name, pattern] of Object.entries(EXPECT)) {
    it(`refuses ${name}`, () => {
      const bytes = new Uint8Array(readFileSync(join(DIR, name)));
      let err: unknown;
      try {
        readFits(bytes, { fileName: name });
      } catch (e) {
        err = e;
      }
      expect(err).toBeInstanceOf(FitsFormatError);
      const line = (err as FitsFormatError).oneLine();
      expect(line.startsWith(`${name}: `)).toBe(true);
      expect(line).toMatch(pattern);
      expect(line).not.toContain('\n');
    });
  }

  it('refuses hostile sizes from the header alone, before reading or allocating the data', () => {
    // A header that claims a million rows in an 8640-byte file. FITS 4.0 §4.4.1.1: the data unit
    // holds |BITPIX|/8 × NAXIS1 × NAXIS2 (+ PCOUNT) bytes; the reader must compare that with the bytes
    // present and stop, naming both, rather than allocate the claimed size. (Speed is not asserted:
    // times belong to the benchmark.)
    const bytes = new Uint8Array(readFileSync(join(DIR, 'too-many-rows.fits')));
    try {
      readFits(bytes);
      expect.unreachable('a data unit larger than the file must be refused');
    } catch (e) {
      expect(e).toBeInstanceOf(FitsFormatError);
      const line = (e as FitsFormatError).oneLine();
      expect(line).toMatch(/NAXIS2 = 1000000 rows/);
      // "byte B: ... only N bytes follow the header": B + N is the whole file, so nothing was read past it.
      const at = Number(/byte (\d+)/.exec(line)?.[1]);
      const follow = Number(/only (\d+) bytes follow the header/.exec(line)?.[1]);
      expect(at % 2880).toBe(0); // headers end on a 2880-byte block (FITS 4.0 §3.1)
      expect(at + follow).toBe(bytes.length);
    }
  });
});
