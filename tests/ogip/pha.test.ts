/**
 * Spectrum (PHA) files per OGIP/92-007 (keyword and column lists from memory of the memo):
 * what writePha puts in the file as the independent reader fitsjs 0.6.6 (patched) sees it, the
 * FITS integer range that decides the COUNTS type, readPha on a file astropy wrote in a layout
 * Kiln does not write, and the errors for bad writer input and unreadable files.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { FitsFormatError, readFits } from '../../generators/fits/index.ts';
import { readPha, writePha } from '../../generators/ogip/index.ts';
import type { PhaData } from '../../generators/response/types.ts';
import { loadFitsjs, openBlob, rowsOf } from '../fits/support/fitsjs.ts';
import { requirePython, runAstropyChecks } from '../support/python.ts';
import { BARE_META, classCards, fileOf, inputError, table, textColumn } from './support/files.ts';

/** Invented values; first channel 0 and non-neutral scales so that every keyword is visible. */
function spectrum(over: Partial<PhaData> = {}): PhaData {
  return {
    meta: BARE_META,
    detchans: 8,
    firstChannel: 0,
    channel: Int32Array.from({ length: 8 }, (_, i) => i),
    counts: Float64Array.from({ length: 8 }, (_, i) => 3 * i),
    rate: null,
    exposureS: 500.5,
    backscal: 0.25,
    areascal: 0.75,
    respfile: 'a.rmf',
    ancrfile: 'a.arf',
    poisserr: false,
    hduclas2: 'NET',
    hduclas3: 'COUNT',
    ...over,
  };
}

/** TFORM of a column of the SPECTRUM extension, by name. */
function tformOf(bytes: Uint8Array, name: string): string | undefined {
  const hdu = readFits(bytes).hdus[1];
  return hdu.table!.column(name)?.tform;
}

describe('writePha: the OGIP/92-007 keywords and columns, read by fitsjs', () => {
  it('SPECTRUM extension with the mandatory keywords and the "none applied" forms of the optional columns', async () => {
    const hdus = await openBlob(loadFitsjs(), writePha(spectrum()));
    const h = hdus[1].header;
    const get = (k: string) => h.get(k);
    expect(get('EXTNAME')).toBe('SPECTRUM');
    expect(['TELESCOP', 'INSTRUME', 'FILTER'].map(get)).toEqual(['TESTSAT', 'TESTCAM', 'OPEN']);
    expect([get('EXPOSURE'), get('BACKSCAL'), get('AREASCAL'), get('CORRSCAL')]).toEqual([500.5, 0.25, 0.75, 0]);
    // No background or correction file: the memo's 'none' (compared without case).
    expect([String(get('BACKFILE')).toUpperCase(), String(get('CORRFILE')).toUpperCase()]).toEqual(['NONE', 'NONE']);
    expect([get('RESPFILE'), get('ANCRFILE')]).toEqual(['a.rmf', 'a.arf']);
    expect([get('HDUCLASS'), get('HDUCLAS1'), get('HDUCLAS2'), get('HDUCLAS3'), get('HDUVERS')]).toEqual(['OGIP', 'SPECTRUM', 'NET', 'COUNT', '1.2.1']);
    // fitsjs gives logical values as the letters T and F.
    expect([get('POISSERR'), get('CHANTYPE'), get('DETCHANS')]).toEqual(['F', 'PI', 8]);
    // SYS_ERR 0, QUALITY 0 (good) and GROUPING 0 (no grouping) as keywords replace the columns.
    expect([get('SYS_ERR'), get('QUALITY'), get('GROUPING')]).toEqual([0, 0, 0]);
    // CHANNEL with its legal range TLMIN..TLMAX = first .. first + DETCHANS - 1; integer COUNTS in counts.
    expect([get('TTYPE1'), get('TFORM1'), get('TLMIN1'), get('TLMAX1')]).toEqual(['CHANNEL', '1J', 0, 7]);
    expect([get('TTYPE2'), get('TFORM2'), get('TUNIT2')]).toEqual(['COUNTS', '1J', 'count']);
    expect(get('TFIELDS')).toBe(2);
    const rows = await rowsOf(hdus[1].data!);
    expect(rows.map((r) => [r.CHANNEL, r.COUNTS])).toEqual(Array.from({ length: 8 }, (_, i) => [i, 3 * i]));
    // No DETNAM and no HISTORY when the input has none (DETNAM is optional in OGIP/92-007).
    expect(get('DETNAM')).toBeNull();
    expect(readFits(writePha(spectrum())).hdus[1].header.commentary('HISTORY')).toEqual([]);
  });

  it('a RATE spectrum: RATE in count/s, no COUNTS column', async () => {
    const rate = Float64Array.from({ length: 8 }, (_, i) => i / 4);
    const bytes = writePha(spectrum({ counts: null, rate, hduclas3: 'RATE' }));
    const h = (await openBlob(loadFitsjs(), bytes))[1].header;
    expect([h.get('TTYPE2'), h.get('TFORM2'), h.get('TUNIT2'), h.get('TFIELDS')]).toEqual(['RATE', '1D', 'count/s', 2]);
    const back = readPha(readFits(bytes)).data;
    expect(back.counts).toBeNull();
    expect(Array.from(back.rate!)).toEqual(Array.from(rate));
  });

  it('COUNTS are J exactly while every value is an integer in the 32-bit range of FITS 4.0 Table 18, else D', () => {
    const of = (values: number[]) => {
      const n = values.length;
      return tformOf(writePha(spectrum({ detchans: n, channel: Int32Array.from({ length: n }, (_, i) => i), counts: Float64Array.from(values) })), 'COUNTS');
    };
    // The bounds of J themselves (-2^31 and 2^31 - 1) still fit.
    expect(of([0, 2147483647])).toBe('1J');
    expect(of([-2147483648, 5])).toBe('1J');
    expect(of([7, 2147483648])).toBe('1D');
    expect(of([-2147483649, 7])).toBe('1D');
    expect(of([2, 1.5])).toBe('1D');
    // D keeps every such value exactly.
    const values = [-2147483649, 2147483648, 1.5];
    const back = readPha(readFits(writePha(spectrum({ detchans: 3, channel: Int32Array.of(0, 1, 2), counts: Float64Array.from(values) })))).data;
    expect(Array.from(back.counts!)).toEqual(values);
  });
});

describe('writePha: bad input is refused with field, value and what was expected', () => {
  it('neither COUNTS nor RATE', () => {
    const e = inputError(() => writePha(spectrum({ counts: null, rate: null })));
    expect(e.message).toBe('spectrum has neither counts nor rate');
    expect(e.where).toMatchObject({ field: 'counts', expected: 'COUNTS or RATE values' });
  });

  it('COUNTS or RATE of another length than CHANNEL', () => {
    const counts = inputError(() => writePha(spectrum({ counts: Float64Array.of(1, 2, 3) })));
    expect(counts.message).toBe('counts differs in length from channel');
    expect(counts.where).toMatchObject({ field: 'counts', value: 3, expected: '8 values' });
    const rate = inputError(() => writePha(spectrum({ rate: Float64Array.of(1) })));
    expect(rate.message).toBe('rate differs in length from channel');
    expect(rate.where).toMatchObject({ field: 'rate', value: 1, expected: '8 values' });
  });
});

describe('readPha: files Kiln did not write', () => {
  const tmp = mkdtempSync(join(tmpdir(), 'kiln-pha-'));
  const astropyPha = join(tmp, 'astropy-rate.pha');
  beforeAll(() => {
    if (!runAstropyChecks) return;
    // OGIP/92-007 type I spectrum as astropy writes it: RATE with STAT_ERR, QUALITY and GROUPING
    // columns, channels 0..3 of a 1024-channel detector, undefined ANCRFILE (no value: an undefined value, FITS 4.0 §4.1.2.3, from memory).
    const code = String.raw`
import sys
import numpy as np
from astropy.io import fits
c = [fits.Column(name='CHANNEL', format='J', array=np.array([0, 1, 2, 3])),
     fits.Column(name='RATE', format='E', unit='count/s', array=np.array([0.5, 1.25, 2.0, 0.0], dtype='f4')),
     fits.Column(name='STAT_ERR', format='E', unit='count/s', array=np.array([0.1, 0.2, 0.3, 0.0], dtype='f4')),
     fits.Column(name='QUALITY', format='I', array=np.array([0, 0, 5, 0])),
     fits.Column(name='GROUPING', format='I', array=np.array([1, -1, 1, 1]))]
s = fits.BinTableHDU.from_columns(c, name='SPECTRUM')
for k, v in [('TELESCOP', 'TESTSAT'), ('INSTRUME', 'TESTCAM'), ('FILTER', 'OPEN'), ('EXPOSURE', 250.0), ('BACKFILE', 'none'),
             ('BACKSCAL', 0.5), ('AREASCAL', 0.8), ('CORRFILE', 'none'), ('CORRSCAL', 1.0), ('RESPFILE', 'x.rmf'),
             ('HDUCLASS', 'OGIP'), ('HDUCLAS1', 'SPECTRUM'), ('HDUCLAS2', 'NET'), ('HDUCLAS3', 'RATE'), ('HDUVERS', '1.2.1'),
             ('POISSERR', False), ('SYS_ERR', 0), ('CHANTYPE', 'PHA'), ('DETCHANS', 1024)]:
    s.header[k] = v
s.header['ANCRFILE'] = None
fits.HDUList([fits.PrimaryHDU(), s]).writeto(sys.argv[1], checksum=True)
`;
    execFileSync(requirePython('astropy'), ['-c', code, astropyPha]);
  });

  it.runIf(runAstropyChecks)('astropy-written RATE spectrum with extra columns: every keyword as written, DETCHANS beyond the rows kept', () => {
    const { data } = readPha(readFits(new Uint8Array(readFileSync(astropyPha)), { fileName: astropyPha }));
    expect(data.counts).toBeNull();
    expect(Array.from(data.rate!)).toEqual([0.5, 1.25, 2, 0]);
    expect(Array.from(data.channel)).toEqual([0, 1, 2, 3]);
    // DETCHANS is the detector's channel count, not the number of rows.
    expect(data.detchans).toBe(1024);
    expect(data).toMatchObject({ exposureS: 250, backscal: 0.5, areascal: 0.8, respfile: 'x.rmf', poisserr: false, hduclas2: 'NET', hduclas3: 'RATE' });
    // An undefined value (no value after '=') is read as no file, not as the text "null".
    expect(data.ancrfile).toBe('');
    expect(data.meta).toMatchObject({ telescop: 'TESTSAT', chantype: 'PHA' });
  });

  it('a SPECTRUM table without HDUCLASn: K (64-bit) CHANNEL, COUNTS, keywords absent', () => {
    const file = fileOf([table('SPECTRUM', [
      { name: 'CHANNEL', tform: '1K', data: BigInt64Array.of(1n, 2n, 3n) },
      { name: 'COUNTS', tform: '1J', data: [4, 0, 9] },
    ], [{ keyword: 'ANCRFILE', value: 'b.arf' }, { keyword: 'POISSERR', value: true }])]);
    const { data } = readPha(file);
    expect(Array.from(data.channel)).toEqual([1, 2, 3]);
    expect(Array.from(data.counts!)).toEqual([4, 0, 9]);
    expect(data.ancrfile).toBe('b.arf');
    expect(data.poisserr).toBe(true);
    // Absent keywords are read as absent: no file names, no class, no DETNAM or CREATOR invented.
    expect([data.respfile, data.hduclas2, data.hduclas3]).toEqual(['', '', '']);
    expect(Object.keys(data.meta)).not.toContain('detnam');
    expect(Object.keys(data.meta)).not.toContain('creator');
    expect(Object.keys(data.meta)).not.toContain('history');
  });

  it('a spectrum found by HDUCLAS1 = SPECTRUM under another EXTNAME', () => {
    const file = fileOf([table('SPEC1', [{ name: 'CHANNEL', tform: '1J', data: [1, 2] }, { name: 'COUNTS', tform: '1J', data: [5, 6] }], classCards('SPECTRUM', 'TOTAL'))]);
    expect(readPha(file).data).toMatchObject({ hduclas2: 'TOTAL' });
  });

  it('refuses a file without a spectrum table, naming the file and what was expected', () => {
    // HDUCLAS1 = SPECTRUM in the primary header: the primary HDU holds no table (FITS 4.0 §7: a BINTABLE is always an extension, never the primary HDU).
    const file = fileOf([table('OTHER', [{ name: 'X', tform: '1J', data: [1] }])], { primaryCards: classCards('SPECTRUM'), fileName: 'x.pha' });
    const e = inputError(() => readPha(file));
    expect(e).toBeInstanceOf(FitsFormatError);
    expect(e.message).toBe('no SPECTRUM extension');
    expect(e.where.file).toBe('x.pha');
    expect(e.where.expected).toMatch(/SPECTRUM.*HDUCLAS1/);
  });

  it('refuses a table with neither COUNTS nor RATE (OGIP/92-007 needs one)', () => {
    const file = fileOf([table('SPECTRUM', [{ name: 'CHANNEL', tform: '1J', data: [1] }, { name: 'STAT_ERR', tform: '1E', data: [1] }])], { fileName: 'y.pha' });
    const e = inputError(() => readPha(file));
    expect(e.message).toBe('missing column COUNTS or RATE');
    expect(e.where).toMatchObject({ file: 'y.pha', field: 'HDU 1 (SPECTRUM)' });
    expect(e.where.expected).toMatch(/COUNTS.*RATE/);
  });

  it('a character column where CHANNEL, COUNTS or RATE belongs is named in the error', () => {
    const numeric = { CHANNEL: { name: 'CHANNEL', tform: '1J', data: [1, 2] }, COUNTS: { name: 'COUNTS', tform: '1J', data: [1, 2] }, RATE: { name: 'RATE', tform: '1E', data: [1, 2] } };
    for (const bad of ['CHANNEL', 'COUNTS', 'RATE'] as const) {
      const columns = Object.values({ ...numeric, [bad]: textColumn(bad, 2) });
      const e = inputError(() => readPha(fileOf([table('SPECTRUM', columns)], { fileName: 'z.pha' })));
      expect(e.message).toBe(`column ${bad} is not numeric`);
      expect(e.where).toMatchObject({ file: 'z.pha', field: `HDU 1 (SPECTRUM) column ${bad}`, expected: 'a numeric column (B, I, J, K, E or D)' });
    }
  });
});
