/**
 * Structural checks on hand-made header views, for the rules not covered by the corpus.
 * Rules from OGIP CAL/GEN/92-002/92-002a and OGIP/92-007 (memory, as stated in the modules).
 */
import { describe, expect, it } from 'vitest';
import { checkArfStructure, checkPhaStructure, checkRmfStructure, type FileView, type HduView } from '../../generators/checks/index.ts';

function hdu(index: number, name: string, cards: Record<string, string | number | boolean>, columns: [string, string?, number?][] = [], rows = 4): HduView {
  return {
    index,
    name,
    header: { get: (k) => cards[k], has: (k) => k in cards },
    columns: columns.map(([n, unit, tlmin]) => ({ name: n, form: '1E', unit, tlmin, tlmax: undefined })),
    rows,
  };
}

const RMF_KW = { HDUCLASS: 'OGIP', HDUCLAS1: 'RESPONSE', HDUCLAS2: 'RSP_MATRIX', HDUVERS: '1.3.0', HDUCLAS3: 'REDIST', TELESCOP: 'T', INSTRUME: 'I', FILTER: 'NONE', CHANTYPE: 'PI', DETCHANS: 4, LO_THRES: 0 };
const EB_KW = { HDUCLASS: 'OGIP', HDUCLAS1: 'RESPONSE', HDUCLAS2: 'EBOUNDS', HDUVERS: '1.2.0', CHANTYPE: 'PI', DETCHANS: 4 };
const MATRIX_COLS: [string, string?, number?][] = [['ENERG_LO', 'keV'], ['ENERG_HI', 'keV'], ['N_GRP'], ['F_CHAN', undefined, 1], ['N_CHAN'], ['MATRIX']];
const EB_COLS: [string, string?, number?][] = [['CHANNEL'], ['E_MIN', 'keV'], ['E_MAX', 'keV']];

function rmfView(over: Record<string, string | number | boolean> = {}, drop: string[] = [], cols = MATRIX_COLS): FileView {
  const kw: Record<string, string | number | boolean> = { ...RMF_KW, ...over };
  for (const d of drop) delete kw[d];
  return { fileName: 'x.rmf', hdus: [hdu(0, '', {}), hdu(1, 'MATRIX', kw, cols), hdu(2, 'EBOUNDS', EB_KW, EB_COLS)] };
}
const status = (v: FileView, id: string) => checkRmfStructure(v, 'p').find((c) => c.id === id)?.status;

describe('RMF structure', () => {
  it('a complete header passes every check', () => {
    expect(checkRmfStructure(rmfView(), 'p').filter((c) => c.status !== 'pass')).toEqual([]);
  });
  it('HDUVERS 1.2.0 warns (older revision), 2.0.0 fails, missing fails', () => {
    expect(status(rmfView({ HDUVERS: '1.2.0' }), 'rmf.matrix.keyword.hduvers')).toBe('warn');
    expect(status(rmfView({ HDUVERS: '2.0.0' }), 'rmf.matrix.keyword.hduvers')).toBe('fail');
    expect(status(rmfView({}, ['HDUVERS']), 'rmf.matrix.keyword.hduvers')).toBe('fail');
  });
  it('HDUCLAS3 outside REDIST|DETECTOR|FULL fails; missing warns', () => {
    expect(status(rmfView({ HDUCLAS3: 'OTHER' }), 'rmf.matrix.keyword.hduclas3')).toBe('fail');
    expect(status(rmfView({}, ['HDUCLAS3']), 'rmf.matrix.keyword.hduclas3')).toBe('warn');
  });
  it('CHANTYPE other than PI/PHA fails; missing FILTER fails; non-integer DETCHANS fails', () => {
    expect(status(rmfView({ CHANTYPE: 'ENERGY' }), 'rmf.matrix.keyword.chantype')).toBe('fail');
    expect(status(rmfView({}, ['FILTER']), 'rmf.matrix.keyword.filter')).toBe('fail');
    expect(status(rmfView({ DETCHANS: 4.5 }), 'rmf.matrix.keyword.detchans')).toBe('fail');
  });
  it('no TLMIN on F_CHAN warns (readers assume 1); missing MATRIX column fails', () => {
    const noTlmin = MATRIX_COLS.map(([n, u]) => [n, u] as [string, string?]);
    expect(status(rmfView({}, [], noTlmin), 'rmf.matrix.tlmin-f_chan')).toBe('warn');
    expect(status(rmfView({}, [], MATRIX_COLS.filter(([n]) => n !== 'MATRIX')), 'rmf.matrix.columns')).toBe('fail');
  });
  it('SPECRESP MATRIX is accepted as the matrix extension', () => {
    const v = rmfView();
    v.hdus[1] = { ...v.hdus[1], name: 'SPECRESP MATRIX' };
    expect(status(v, 'rmf.ext.matrix')).toBe('pass');
  });
});

describe('ARF and PHA structure', () => {
  const arfKw = { HDUCLASS: 'OGIP', HDUCLAS1: 'RESPONSE', HDUCLAS2: 'SPECRESP', HDUVERS: '1.1.0', TELESCOP: 'T', INSTRUME: 'I', FILTER: 'NONE' };
  it('cm^2 and cm2 are the same unit as cm**2 (FITS 4.0 §4.3)', () => {
    for (const u of ['cm**2', 'cm^2', 'cm2']) {
      const v: FileView = { fileName: 'a.arf', hdus: [hdu(0, '', {}), hdu(1, 'SPECRESP', arfKw, [['ENERG_LO', 'keV'], ['ENERG_HI', 'keV'], ['SPECRESP', u]])] };
      expect(checkArfStructure(v, 'p').filter((c) => c.status !== 'pass'), u).toEqual([]);
    }
  });
  it('PHA: POISSERR = F needs STAT_ERR; BACKSCAL may be a column', () => {
    const kw = { HDUCLASS: 'OGIP', HDUCLAS1: 'SPECTRUM', HDUVERS: '1.2.1', HDUCLAS2: 'TOTAL', HDUCLAS3: 'COUNT', TELESCOP: 'T', INSTRUME: 'I', FILTER: 'NONE', EXPOSURE: 10, AREASCAL: 1, RESPFILE: 'none', ANCRFILE: 'none', POISSERR: false, CHANTYPE: 'PI', DETCHANS: 4 };
    const v: FileView = { fileName: 'a.pha', hdus: [hdu(0, '', {}), hdu(1, 'SPECTRUM', kw, [['CHANNEL'], ['COUNTS'], ['BACKSCAL']])] };
    const byId = Object.fromEntries(checkPhaStructure(v, 'p').map((c) => [c.id, c.status]));
    expect(byId['pha.spectrum.keyword.poisserr']).toBe('fail');
    expect(byId['pha.spectrum.keyword.backscal']).toBe('pass');
    v.hdus[1].columns.push({ name: 'STAT_ERR', form: '1E', unit: undefined, tlmin: undefined, tlmax: undefined });
    expect(checkPhaStructure(v, 'p').find((c) => c.id === 'pha.spectrum.keyword.poisserr')!.status).toBe('pass');
  });
});
