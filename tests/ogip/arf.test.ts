/**
 * Ancillary response files per OGIP CAL/GEN/92-002 (keyword and column lists from memory of the
 * memo): writeArf as the independent reader fitsjs 0.6.6 (patched) sees it, readArf on layouts the
 * memo allows that Kiln does not write, the shared meta keywords read where the file has them, and
 * the errors for bad writer input and unreadable files.
 */
import { describe, expect, it } from 'vitest';
import { FitsFormatError, readFits } from '../../generators/fits/index.ts';
import { readArf, writeArf } from '../../generators/ogip/index.ts';
import type { ArfData } from '../../generators/response/types.ts';
import { loadFitsjs, openBlob, rowsOf } from '../fits/support/fitsjs.ts';
import { BARE_META, classCards, fileOf, inputError, table, textColumn } from './support/files.ts';

const f32 = (a: ArrayLike<number>) => Array.from(a, Math.fround);
/** Invented effective areas. */
function arf(over: Partial<ArfData> = {}): ArfData {
  return { meta: BARE_META, energLoKeV: Float64Array.of(0.3, 0.4, 0.5), energHiKeV: Float64Array.of(0.4, 0.5, 0.6), specrespCm2: Float64Array.of(10.5, 20.25, 0), ...over };
}
const columns = (cols: Partial<Record<'ENERG_LO' | 'ENERG_HI' | 'SPECRESP', ReturnType<typeof textColumn>>> = {}) => [
  cols.ENERG_LO ?? { name: 'ENERG_LO', tform: '1E', data: [1, 2] },
  cols.ENERG_HI ?? { name: 'ENERG_HI', tform: '1E', data: [2, 3] },
  cols.SPECRESP ?? { name: 'SPECRESP', tform: '1E', data: [5, 6] },
];

describe('writeArf: the CAL/GEN/92-002 SPECRESP extension, read by fitsjs', () => {
  it('EXTNAME, class keywords, columns in keV and cm**2, values as float32', async () => {
    const bytes = writeArf(arf());
    // fitsjs never calls back on a file without a table; make such a file fail here, not time out.
    expect(readFits(bytes).hdus.map((h) => h.table?.columns.length ?? 0)).toEqual([0, 3]);
    const hdus = await openBlob(loadFitsjs(), bytes);
    const get = (k: string) => hdus[1].header.get(k);
    expect(get('EXTNAME')).toBe('SPECRESP');
    expect([get('HDUCLASS'), get('HDUCLAS1'), get('HDUCLAS2'), get('HDUVERS')]).toEqual(['OGIP', 'RESPONSE', 'SPECRESP', '1.1.0']);
    expect(['TELESCOP', 'INSTRUME', 'FILTER'].map(get)).toEqual(['TESTSAT', 'TESTCAM', 'OPEN']);
    expect(get('TFIELDS')).toBe(3);
    expect([1, 2, 3].map((i) => [get(`TTYPE${i}`), get(`TFORM${i}`), get(`TUNIT${i}`)])).toEqual([
      ['ENERG_LO', '1E', 'keV'],
      ['ENERG_HI', '1E', 'keV'],
      ['SPECRESP', '1E', 'cm**2'],
    ]);
    const rows = await rowsOf(hdus[1].data!);
    const input = arf();
    expect(rows.map((r) => [r.ENERG_LO, r.ENERG_HI, r.SPECRESP])).toEqual([0, 1, 2].map((i) => f32([input.energLoKeV[i], input.energHiKeV[i], input.specrespCm2[i]])));
    // DETNAM is optional (CAL/GEN/92-002): no card when the input has none; no HISTORY either.
    expect(get('DETNAM')).toBeNull();
    expect(readFits(bytes).hdus[1].header.commentary('HISTORY')).toEqual([]);
  });

  it('refuses columns of unequal length, saying which lengths it got', () => {
    const e = inputError(() => writeArf(arf({ specrespCm2: Float64Array.of(1) })));
    expect(e.message).toBe('ARF columns differ in length');
    expect(e.where).toMatchObject({ field: 'specrespCm2', value: { energLo: 3, energHi: 3, specresp: 1 } });
    expect(e.where.expected).toMatch(/ENERG_LO.*ENERG_HI.*SPECRESP/);
    expect(inputError(() => writeArf(arf({ energHiKeV: Float64Array.of(1, 2) }))).where.value).toEqual({ energLo: 3, energHi: 2, specresp: 3 });
  });
});

describe('readArf: files Kiln did not write', () => {
  it('SPECRESP table without class keywords, and an effective-area table found by HDUCLAS1/2 under another EXTNAME', () => {
    expect(Array.from(readArf(fileOf([table('SPECRESP', columns())])).data.specrespCm2)).toEqual([5, 6]);
    const other = readArf(fileOf([table('EFFAREA', columns(), classCards('RESPONSE', 'SPECRESP'))])).data;
    expect(Array.from(other.energLoKeV)).toEqual([1, 2]);
    expect(Array.from(other.energHiKeV)).toEqual([2, 3]);
  });

  it('a matrix (HDUCLAS2 RSP_MATRIX) or a spectrum class with HDUCLAS2 SPECRESP is not an effective-area table', () => {
    // HDUCLAS2 refines HDUCLAS1: SPECRESP means effective area only under HDUCLAS1 = RESPONSE.
    for (const cards of [classCards('RESPONSE', 'RSP_MATRIX'), classCards('SPECTRUM', 'SPECRESP')]) {
      const e = inputError(() => readArf(fileOf([table('EXT', columns(), cards)], { fileName: 'm.fits' })));
      expect(e).toBeInstanceOf(FitsFormatError);
      expect(e.message).toBe('no SPECRESP extension');
      expect(e.where.file).toBe('m.fits');
      expect(e.where.expected).toMatch(/SPECRESP.*HDUCLAS2/);
    }
  });

  it('a character column where ENERG_LO, ENERG_HI or SPECRESP belongs is named in the error', () => {
    for (const bad of ['ENERG_LO', 'ENERG_HI', 'SPECRESP'] as const) {
      const e = inputError(() => readArf(fileOf([table('SPECRESP', columns({ [bad]: textColumn(bad, 2) }))], { fileName: 'a.arf' })));
      expect(e.message).toBe(`column ${bad} is not numeric`);
      expect(e.where).toMatchObject({ file: 'a.arf', field: `HDU 1 (SPECRESP) column ${bad}` });
    }
  });

  it('a vector cell (TFORMn repeat count > 1, FITS 4.0 §7.3.1) is read as its first element, an empty variable-length cell as NaN', () => {
    // Kiln's documented reading rule for scalar quantities stored in array cells (no outside source).
    const file = fileOf([table('SPECRESP', [
      { name: 'ENERG_LO', tform: '1PE', data: [Float32Array.of(1), Float32Array.of()] },
      { name: 'ENERG_HI', tform: '1E', data: [2, 3] },
      { name: 'SPECRESP', tform: '2E', data: [[5, 50], [6, 60]] },
    ])]);
    const { data } = readArf(file);
    expect(Array.from(data.specrespCm2)).toEqual([5, 6]);
    expect(data.energLoKeV[0]).toBe(1);
    expect(Number.isNaN(data.energLoKeV[1])).toBe(true);
  });
});

describe('shared meta keywords: read where the file has them, never invented', () => {
  it('CREATOR from the extension or else the primary header; absent in both, absent in the result', () => {
    const withCreator = (primary: boolean, ext: boolean) =>
      readArf(fileOf([table('SPECRESP', columns(), ext ? [{ keyword: 'CREATOR', value: 'ext-tool' }] : [])], { primaryCards: primary ? [{ keyword: 'CREATOR', value: 'primary-tool' }] : [] })).data.meta;
    expect(withCreator(false, true).creator).toBe('ext-tool');
    expect(withCreator(true, false).creator).toBe('primary-tool');
    expect(withCreator(true, true).creator).toBe('ext-tool');
    expect(Object.keys(withCreator(false, false))).not.toContain('creator');
  });

  it('DETNAM and HISTORY as written; a keyword without a value (undefined value, FITS 4.0 §4.1.2.3 from memory) is an empty string', () => {
    const meta = readArf(fileOf([table('SPECRESP', columns(), [
      { keyword: 'TELESCOP', value: null },
      { keyword: 'DETNAM', value: 'CCD1' },
      { keyword: 'HISTORY', comment: 'step one' },
      { keyword: 'HISTORY', comment: 'step two' },
    ])])).data.meta;
    expect(meta.telescop).toBe('');
    // The same for a value-less keyword the extension leaves to the primary header.
    const fromPrimary = readArf(fileOf([table('SPECRESP', columns())], { primaryCards: [{ keyword: 'INSTRUME', value: null }] })).data.meta;
    expect(fromPrimary.instrume).toBe('');
    expect(meta.detnam).toBe('CCD1');
    expect(meta.history).toEqual(['step one', 'step two']);
    const bare = readArf(fileOf([table('SPECRESP', columns())])).data.meta;
    expect(Object.keys(bare)).not.toContain('detnam');
    expect(Object.keys(bare)).not.toContain('history');
  });

  it('the writers write DETNAM and HISTORY exactly when given', () => {
    const meta = { ...BARE_META, detnam: 'CCD2', history: ['made for a test'] };
    const h = readFits(writeArf(arf({ meta }))).hdus[1].header;
    expect(h.get('DETNAM')).toBe('CCD2');
    expect(h.commentary('HISTORY')).toEqual(['made for a test']);
  });
});
