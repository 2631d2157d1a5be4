/**
 * OGIP products against the reference readers: RMF/ARF per OGIP CAL/GEN/92-002 (+92-002a),
 * PHA per OGIP/92-007, opened with astropy.io.fits (Debian python3-astropy) and fitsjs 0.6.6
 * (patched); and RMFs written by astropy in layouts Kiln does not write, read back via readRmf.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { FitsFormatError, readFits, writeFits } from '../../generators/fits/index.ts';
import { identifyProduct, readArf, readPha, readRmf, writeArf, writePha, writeRmf } from '../../generators/ogip/index.ts';
import type { ArfData, PhaData, RmfData } from '../../generators/response/types.ts';
import { requirePython, runAstropyChecks } from '../support/python.ts';
import { astropyRun, astropyView } from '../fits/support/astropy.ts';
import { loadFitsjs, openBlob, rowsOf } from '../fits/support/fitsjs.ts';

const ROOT = join(import.meta.dirname, '..', '..');
const tmp = mkdtempSync(join(tmpdir(), 'kiln-ogip-'));
/** Invented test mission and values. */
const META = { telescop: 'TESTSAT', instrume: 'TESTCAM', detnam: 'CCD0', filter: 'OPEN', chantype: 'PI' as const, date: '2024-05-01', history: ['invented test values'] };

function makeRmf(hduclas3: RmfData['hduclas3'] = 'REDIST'): RmfData {
  const nE = 12;
  const det = 16;
  const rows = Array.from({ length: nE }, (_, i) => {
    if (i === 0) return { fChan: new Int32Array(0), nChan: new Int32Array(0), matrix: new Float32Array(0) };
    const groups = i % 3 === 0 ? 2 : 1;
    const fChan = groups === 2 ? Int32Array.of(1 + (i % 4), 10) : Int32Array.of(1 + (i % 5));
    const nChan = groups === 2 ? Int32Array.of(3, 1 + (i % 3)) : Int32Array.of(1 + (i % 6));
    let n = 0;
    for (const w of nChan) n += w;
    return { fChan, nChan, matrix: Float32Array.from({ length: n }, (_, k) => 1 / (k + 1 + i)) };
  });
  return {
    meta: META,
    hduclas3,
    detchans: det,
    firstChannel: 1,
    loThres: 1e-6,
    energLoKeV: Float64Array.from({ length: nE }, (_, i) => 0.3 + 0.1 * i),
    energHiKeV: Float64Array.from({ length: nE }, (_, i) => 0.4 + 0.1 * i),
    rows,
    ebounds: { firstChannel: 1, eMinKeV: Float64Array.from({ length: det }, (_, i) => 0.05 * i), eMaxKeV: Float64Array.from({ length: det }, (_, i) => 0.05 * (i + 1)) },
  };
}
const ARF: ArfData = { meta: META, energLoKeV: Float64Array.of(0.3, 0.4, 0.5), energHiKeV: Float64Array.of(0.4, 0.5, 0.6), specrespCm2: Float64Array.of(10.5, 20.25, 0) };
const PHA: PhaData = {
  meta: META, detchans: 16, firstChannel: 1, channel: Int32Array.from({ length: 16 }, (_, i) => i + 1),
  counts: Float64Array.from({ length: 16 }, (_, i) => i * i), rate: null, exposureS: 1000, backscal: 1, areascal: 1,
  respfile: 'test.rmf', ancrfile: 'test.arf', poisserr: true, hduclas2: 'TOTAL', hduclas3: 'COUNT',
};

const f32 = (a: ArrayLike<number>) => Array.from(a, Math.fround);

describe('writers: files that the reference readers accept', () => {
  const products = {
    'test.rmf': writeRmf(makeRmf()),
    'full.rmf': writeRmf(makeRmf('FULL')),
    'test.arf': writeArf(ARF),
    'test.pha': writePha(PHA),
  };
  for (const [name, bytes] of Object.entries(products)) writeFileSync(join(tmp, name), bytes);

  it('are deterministic', () => {
    expect(Buffer.from(writeRmf(makeRmf())).equals(Buffer.from(products['test.rmf']))).toBe(true);
  });

  it.runIf(runAstropyChecks)("astropy: verify('exception') and checksums pass, OGIP keywords as required", () => {
    for (const name of Object.keys(products)) {
      const v = astropyView(join(tmp, name));
      expect(v.verifyError, name).toBeNull();
      expect(v.warnings, name).toEqual([]);
      for (const h of v.hdus) expect([name, h.name, h.checksumValid, h.datasumValid]).toEqual([name, h.name, 1, 1]);
    }
    // OGIP CAL/GEN/92-002 keywords and columns.
    const rmf = astropyView(join(tmp, 'test.rmf'));
    const m = rmf.hdus[1];
    expect(m.name).toBe('MATRIX');
    expect(m.header).toMatchObject({ HDUCLASS: 'OGIP', HDUCLAS1: 'RESPONSE', HDUCLAS2: 'RSP_MATRIX', HDUCLAS3: 'REDIST', HDUVERS: '1.3.0', TELESCOP: 'TESTSAT', INSTRUME: 'TESTCAM', DETNAM: 'CCD0', FILTER: 'OPEN', CHANTYPE: 'PI', DETCHANS: 16, LO_THRES: 1e-6, TLMIN4: 1, TLMAX4: 16, DATE: '2024-05-01', CREATOR: 'kiln' });
    expect(Object.keys(m.columns)).toEqual(['ENERG_LO', 'ENERG_HI', 'N_GRP', 'F_CHAN', 'N_CHAN', 'MATRIX']);
    expect(m.columns.ENERG_LO.unit).toBe('keV');
    expect(m.columns.F_CHAN.format).toMatch(/^1PJ/);
    expect(m.columns.MATRIX.format).toMatch(/^1PE/);
    expect(rmf.hdus[2].header).toMatchObject({ EXTNAME: 'EBOUNDS', HDUCLAS2: 'EBOUNDS' });
    expect(Object.keys(rmf.hdus[2].columns)).toEqual(['CHANNEL', 'E_MIN', 'E_MAX']);
    expect(astropyView(join(tmp, 'full.rmf')).hdus[1].name).toBe('SPECRESP MATRIX');
    const arf = astropyView(join(tmp, 'test.arf')).hdus[1];
    expect(arf.header).toMatchObject({ EXTNAME: 'SPECRESP', HDUCLAS2: 'SPECRESP', HDUVERS: '1.1.0' });
    expect(arf.columns.SPECRESP.unit).toBe('cm**2');
    // OGIP/92-007 mandatory keywords (memory of the memo's list; names checked, not their comments).
    const pha = astropyView(join(tmp, 'test.pha')).hdus[1];
    expect(pha.header).toMatchObject({ EXTNAME: 'SPECTRUM', HDUCLAS1: 'SPECTRUM', EXPOSURE: 1000, BACKSCAL: 1, AREASCAL: 1, RESPFILE: 'test.rmf', ANCRFILE: 'test.arf', POISSERR: true, CHANTYPE: 'PI', DETCHANS: 16 });
    expect(pha.columns.COUNTS.values).toEqual(Array.from(PHA.counts!));
  });

  it.runIf(runAstropyChecks)('astropy reads the same RMF values as readRmf, variable-length arrays included', () => {
    const v = astropyView(join(tmp, 'test.rmf')).hdus[1].columns;
    const ours = readRmf(readFits(products['test.rmf'])).data;
    expect(v.ENERG_LO.values).toEqual(Array.from(ours.energLoKeV));
    expect(v.N_GRP.values).toEqual(ours.rows.map((r) => r.fChan.length));
    expect(v.F_CHAN.values).toEqual(ours.rows.map((r) => Array.from(r.fChan)));
    expect(v.N_CHAN.values).toEqual(ours.rows.map((r) => Array.from(r.nChan)));
    expect(v.MATRIX.values).toEqual(ours.rows.map((r) => Array.from(r.matrix)));
    // And both equal the input, after float32 rounding of E columns.
    const input = makeRmf();
    expect(v.MATRIX.values).toEqual(input.rows.map((r) => f32(r.matrix)));
    expect(v.ENERG_LO.values).toEqual(f32(input.energLoKeV));
  });

  it('fitsjs (patched) reads the same RMF values', async () => {
    const hdus = await openBlob(loadFitsjs(), products['test.rmf']);
    const rows = await rowsOf(hdus[1].data!);
    const input = makeRmf();
    expect(rows.map((r) => Array.from(r.MATRIX as Float32Array))).toEqual(input.rows.map((r) => f32(r.matrix)));
    expect(rows.map((r) => Array.from(r.F_CHAN as Int32Array))).toEqual(input.rows.map((r) => Array.from(r.fChan)));
    expect(rows.map((r) => r.N_GRP)).toEqual(input.rows.map((r) => r.fChan.length));
    const eb = await rowsOf(hdus[2].data!);
    expect(eb.map((r) => r.E_MIN)).toEqual(f32(input.ebounds.eMinKeV));
    expect(hdus[1].header.get('HDUCLAS2')).toBe('RSP_MATRIX');
  });

  it('round-trip through the readers, and identifyProduct', () => {
    const rmf = readRmf(readFits(products['test.rmf']));
    const input = makeRmf();
    expect(rmf.data.rows.map((r) => [Array.from(r.fChan), Array.from(r.nChan), Array.from(r.matrix)])).toEqual(input.rows.map((r) => [Array.from(r.fChan), Array.from(r.nChan), f32(r.matrix)]));
    expect(rmf.data).toMatchObject({ detchans: 16, firstChannel: 1, hduclas3: 'REDIST', meta: { ...META, creator: 'kiln' } });
    expect(rmf.data.loThres).toBe(1e-6);
    expect(rmf.headers.matrix.getString('HDUVERS')).toBe('1.3.0');
    expect(readRmf(readFits(products['full.rmf'])).data.hduclas3).toBe('FULL');
    const arf = readArf(readFits(products['test.arf'])).data;
    expect(Array.from(arf.specrespCm2)).toEqual(f32(ARF.specrespCm2));
    const pha = readPha(readFits(products['test.pha'])).data;
    expect(pha).toMatchObject({ detchans: 16, firstChannel: 1, exposureS: 1000, poisserr: true, respfile: 'test.rmf', hduclas2: 'TOTAL', hduclas3: 'COUNT', rate: null });
    expect(Array.from(pha.counts!)).toEqual(Array.from(PHA.counts!));
    expect(identifyProduct(readFits(products['test.rmf']))).toBe('rmf');
    expect(identifyProduct(readFits(products['full.rmf']))).toBe('rmf');
    expect(identifyProduct(readFits(products['test.arf']))).toBe('arf');
    expect(identifyProduct(readFits(products['test.pha']))).toBe('pha');
    expect(identifyProduct(readFits(writeFits([{ kind: 'primary' }])))).toBeNull();
  });

  it('refuses inconsistent writer input', () => {
    const bad = makeRmf();
    bad.rows[2] = { ...bad.rows[2], matrix: new Float32Array(99) };
    expect(() => writeRmf(bad)).toThrow(/matrix length is not the sum of nChan/);
    expect(() => writeArf({ ...ARF, specrespCm2: Float64Array.of(1) })).toThrow(/differ in length/);
  });
});

describe('readers: files Kiln did not write', () => {
  it.runIf(runAstropyChecks)('committed astropy fixture: SPECRESP MATRIX, fixed-width 2J/8E columns, no TLMIN', () => {
    // Made by scripts/make-astropy-rmf-fits.py with astropy; the expected values are the script's inputs.
    const file = readFits(new Uint8Array(readFileSync(join(ROOT, 'tests', 'fixtures', 'fits', 'astropy-fixed-width.rmf'))));
    expect(file.hdus.map((h) => h.checksum.checksum)).toEqual(['ok', 'ok', 'ok']);
    const { data, headers } = readRmf(file);
    expect(data.hduclas3).toBe('FULL');
    expect(data.firstChannel).toBe(1); // OGIP default without TLMIN
    expect(headers.matrix.has('TLMIN4')).toBe(false);
    expect(data.rows.map((r) => Array.from(r.fChan))).toEqual([[1], [2, 6], [], [3], [1, 7]]);
    expect(data.rows.map((r) => Array.from(r.nChan))).toEqual([[3], [2, 2], [], [4], [1, 2]]);
    expect(data.rows.map((r) => Array.from(r.matrix))).toEqual([[0.25, 0.5, 0.25], f32([0.1, 0.2, 0.3, 0.4]), [], [0.125, 0.375, 0.375, 0.125], [0.5, 0.25, 0.25]]);
    expect(Array.from(data.ebounds.eMaxKeV)).toEqual([0.5, 1, 1.5, 2, 2.5, 3, 3.5, 4]);
    // The committed fixture is what the committed script writes (astropy, same version).
    const again = join(tmp, 'again.rmf');
    execFileSync(requirePython('astropy'), [join(ROOT, 'scripts', 'make-astropy-rmf-fits.py'), again]);
    const b = readRmf(readFits(new Uint8Array(readFileSync(again)))).data;
    expect(b.rows).toEqual(data.rows);
  });

  it.runIf(runAstropyChecks)('astropy-written RMF with scalar F_CHAN/N_CHAN (one group per row), bad values kept for the checks', () => {
    const path = join(tmp, 'scalar.rmf');
    astropyRun(`c = [fits.Column(name='ENERG_LO', format='E', unit='keV', array=np.array([1.0, 2.0])),
     fits.Column(name='ENERG_HI', format='E', unit='keV', array=np.array([2.0, 3.0])),
     fits.Column(name='N_GRP', format='J', array=np.array([1, 1])),
     fits.Column(name='F_CHAN', format='J', array=np.array([0, 2])),
     fits.Column(name='N_CHAN', format='J', array=np.array([2, 3])),
     fits.Column(name='MATRIX', format='PE()', array=np.array([np.array([0.5, -0.25], dtype='f4'), np.array([np.nan, 1, 0], dtype='f4')], dtype=object))]
m = fits.BinTableHDU.from_columns(c, name='MATRIX')
m.header['TLMIN4'] = 0
m.header['DETCHANS'] = 6
m.header['HDUCLASS'] = 'OGIP'
m.header['HDUCLAS1'] = 'RESPONSE'
m.header['HDUCLAS2'] = 'RSP_MATRIX'
fits.HDUList([fits.PrimaryHDU(), m]).writeto(arg, checksum=True)
print('null')`, path);
    const { data, headers } = readRmf(readFits(new Uint8Array(readFileSync(path)), { fileName: path }));
    expect(data.firstChannel).toBe(0);
    expect(data.rows.map((r) => Array.from(r.fChan))).toEqual([[0], [2]]);
    expect(Array.from(data.rows[0].matrix)).toEqual([0.5, -0.25]);
    expect(Number.isNaN(data.rows[1].matrix[0])).toBe(true);
    expect(headers.ebounds).toBeNull();
    expect(data.ebounds.eMinKeV.length).toBe(0);
    expect(data.meta.telescop).toBe('');
  });

  it('throws only when the structure makes reading impossible', () => {
    const noMatrix = readFits(writeArf(ARF), { fileName: 'x.arf' });
    expect(() => readRmf(noMatrix)).toThrow(FitsFormatError);
    expect(() => readRmf(noMatrix)).toThrow(/no MATRIX extension/);
    const missingCol = readFits(writeFits([{ kind: 'primary' }, { kind: 'bintable', name: 'MATRIX', columns: [{ name: 'ENERG_LO', tform: '1E', data: [1] }] }]));
    expect(() => readRmf(missingCol)).toThrow(/missing column ENERG_HI/);
    expect(() => readPha(noMatrix)).toThrow(/no SPECTRUM extension/);
    expect(() => readArf(readFits(writePha(PHA)))).toThrow(/no SPECRESP extension/);
  });
});
