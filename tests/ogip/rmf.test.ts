/**
 * Redistribution matrices per OGIP CAL/GEN/92-002 and 92-002a (from memory of the memos): the
 * writer's refusals of inconsistent input, the extension name and the N_GRP integer type, and
 * readRmf on layouts the memos allow that Kiln does not write (other EXTNAMEs, 64-bit integer
 * groups, no DETCHANS), with the errors that name the column or table that cannot be read.
 */
import { describe, expect, it } from 'vitest';
import { FitsFormatError, readFits, type ColumnInput } from '../../generators/fits/index.ts';
import { readRmf, writeRmf } from '../../generators/ogip/index.ts';
import type { RmfData, RmfRow } from '../../generators/response/types.ts';
import { loadFitsjs, openBlob } from '../fits/support/fitsjs.ts';
import { BARE_META, classCards, fileOf, inputError, table, textColumn } from './support/files.ts';

/** Invented matrix: `rows` rows over `detchans` channels, each row's groups as [first, width]. */
function rmf(groups: [number, number][][], detchans: number, over: Partial<RmfData> = {}): RmfData {
  const rows: RmfRow[] = groups.map((g) => {
    const width = g.reduce((s, [, w]) => s + w, 0);
    return { fChan: Int32Array.from(g, ([f]) => f), nChan: Int32Array.from(g, ([, w]) => w), matrix: new Float32Array(width).fill(1 / Math.max(1, width)) };
  });
  return {
    meta: BARE_META,
    hduclas3: 'REDIST',
    detchans,
    firstChannel: 1,
    loThres: 0,
    energLoKeV: Float64Array.from(groups, (_, i) => 1 + i),
    energHiKeV: Float64Array.from(groups, (_, i) => 2 + i),
    rows,
    ebounds: { firstChannel: 1, eMinKeV: Float64Array.from({ length: detchans }, (_, i) => i), eMaxKeV: Float64Array.from({ length: detchans }, (_, i) => i + 1) },
    ...over,
  };
}
const SMALL = (): RmfData => rmf([[[1, 2]], [[2, 1], [4, 1]]], 4);

type Col = 'ENERG_LO' | 'ENERG_HI' | 'N_GRP' | 'F_CHAN' | 'N_CHAN' | 'MATRIX';
/** MATRIX columns of two rows over channels 1..4 (grouped form), any of them replaced. */
function matrixColumns(replace: Partial<Record<Col, ColumnInput | null>> = {}, fChan: Partial<ColumnInput> = { tlmin: 1, tlmax: 4 }): ColumnInput[] {
  const base: Record<Col, ColumnInput> = {
    ENERG_LO: { name: 'ENERG_LO', tform: '1E', data: [1, 2] },
    ENERG_HI: { name: 'ENERG_HI', tform: '1E', data: [2, 3] },
    N_GRP: { name: 'N_GRP', tform: '1I', data: [1, 2] },
    F_CHAN: { name: 'F_CHAN', tform: '1PJ', data: [Int32Array.of(1), Int32Array.of(2, 4)], ...fChan },
    N_CHAN: { name: 'N_CHAN', tform: '1PJ', data: [Int32Array.of(2), Int32Array.of(1, 1)] },
    MATRIX: { name: 'MATRIX', tform: '1PE', data: [Float32Array.of(0.5, 0.5), Float32Array.of(0.25, 0.75)] },
  };
  return (Object.keys(base) as Col[]).flatMap((k) => (k in replace ? (replace[k] ? [replace[k]!] : []) : [base[k]]));
}
type EbCol = 'CHANNEL' | 'E_MIN' | 'E_MAX';
function eboundsColumns(replace: Partial<Record<EbCol, ColumnInput>> = {}): ColumnInput[] {
  return [
    replace.CHANNEL ?? { name: 'CHANNEL', tform: '1J', data: [1, 2, 3, 4] },
    replace.E_MIN ?? { name: 'E_MIN', tform: '1E', data: [0, 1, 2, 3] },
    replace.E_MAX ?? { name: 'E_MAX', tform: '1E', data: [1, 2, 3, 4] },
  ];
}
const rowsOf = (d: RmfData) => d.rows.map((r) => [Array.from(r.fChan), Array.from(r.nChan), Array.from(r.matrix)]);

describe('writeRmf: inconsistent input is refused with field, value and what was expected', () => {
  it('energy grid and rows of different lengths', () => {
    const hi = inputError(() => writeRmf({ ...SMALL(), energHiKeV: Float64Array.of(2) }));
    expect(hi.message).toBe('energy grid and matrix rows differ in length');
    expect(hi.where).toMatchObject({ field: 'rows', value: { energHi: 1, rows: 2 }, expected: 'ENERG_LO, ENERG_HI and rows all of length 2' });
    const rows = inputError(() => writeRmf({ ...SMALL(), rows: SMALL().rows.slice(0, 1) }));
    expect(rows.where).toMatchObject({ field: 'rows', value: { energHi: 2, rows: 1 } });
  });

  it('a row whose fChan and nChan differ in length, or whose matrix is not the sum of nChan', () => {
    const d = SMALL();
    const groups = inputError(() => writeRmf({ ...d, rows: [d.rows[0], { ...d.rows[1], nChan: Int32Array.of(1) }] }));
    expect(groups.message).toBe('fChan and nChan differ in length');
    expect(groups.where).toMatchObject({ field: 'rows[1]', expected: 'one first channel and one width per group' });
    const sum = inputError(() => writeRmf({ ...d, rows: [d.rows[0], { ...d.rows[1], matrix: new Float32Array(5) }] }));
    expect(sum.message).toBe('matrix length is not the sum of nChan');
    expect(sum.where).toMatchObject({ field: 'rows[1].matrix', value: 5, expected: '2 elements' });
  });

  it('EBOUNDS E_MIN or E_MAX not of DETCHANS rows', () => {
    const d = SMALL();
    const min = inputError(() => writeRmf({ ...d, ebounds: { ...d.ebounds, eMinKeV: Float64Array.of(0, 1, 2) } }));
    expect(min.message).toBe('EBOUNDS length differs from DETCHANS');
    expect(min.where).toMatchObject({ field: 'ebounds', value: 3, expected: '4 channels' });
    expect(inputError(() => writeRmf({ ...d, ebounds: { ...d.ebounds, eMaxKeV: Float64Array.of(1) } })).where.field).toBe('ebounds');
  });
});

describe('writeRmf: extension name and N_GRP type', () => {
  it("HDUCLAS3 FULL is written as 'SPECRESP MATRIX', REDIST as 'MATRIX' (CAL/GEN/92-002a), as fitsjs reads it", async () => {
    const name = async (hduclas3: RmfData['hduclas3']) => (await openBlob(loadFitsjs(), writeRmf({ ...SMALL(), hduclas3 })))[1].header.get('EXTNAME');
    expect(await name('FULL')).toBe('SPECRESP MATRIX');
    expect(await name('REDIST')).toBe('MATRIX');
  });

  it('N_GRP is I up to 32767 groups in a row and J beyond (the 16-bit range of FITS 4.0 Table 18)', () => {
    // One row with n adjacent one-channel groups over n channels.
    const ofGroups = (n: number) => {
      const d = rmf([Array.from({ length: n }, (_, k): [number, number] => [k + 1, 1]), [[1, 1]]], n);
      const file = readFits(writeRmf(d));
      return { tform: file.hdus[1].table!.column('N_GRP')!.tform, groups: readRmf(file).data.rows.map((r) => r.fChan.length) };
    };
    expect(ofGroups(32767)).toEqual({ tform: '1I', groups: [32767, 1] });
    expect(ofGroups(32768)).toEqual({ tform: '1J', groups: [32768, 1] });
  });
});

describe('readRmf: files Kiln did not write', () => {
  it("'SPECRESP MATRIX' without class keywords, and a matrix found by HDUCLAS1/2 under another EXTNAME", () => {
    const byName = readRmf(fileOf([table('SPECRESP MATRIX', matrixColumns())])).data;
    expect(rowsOf(byName)).toEqual([[[1], [2], [0.5, 0.5]], [[2, 4], [1, 1], [0.25, 0.75]]]);
    const byClass = readRmf(fileOf([table('RESP', matrixColumns(), classCards('RESPONSE', 'RSP_MATRIX'))])).data;
    expect(rowsOf(byClass)).toEqual(rowsOf(byName));
  });

  it('an effective-area class or RSP_MATRIX under another HDUCLAS1 is not a matrix', () => {
    // HDUCLAS2 refines HDUCLAS1: RSP_MATRIX means a matrix only under HDUCLAS1 = RESPONSE.
    for (const cards of [classCards('RESPONSE', 'SPECRESP'), classCards('SPECTRUM', 'RSP_MATRIX')]) {
      const e = inputError(() => readRmf(fileOf([table('EXT', matrixColumns(), cards)], { fileName: 'r.fits' })));
      expect(e).toBeInstanceOf(FitsFormatError);
      expect(e.message).toBe('no MATRIX extension');
      expect(e.where.file).toBe('r.fits');
      expect(e.where.expected).toMatch(/MATRIX.*SPECRESP MATRIX.*HDUCLAS1.*RESPONSE.*HDUCLAS2.*RSP_MATRIX/);
    }
  });

  it('EBOUNDS found by EXTNAME alone, or by HDUCLAS2 = EBOUNDS under another EXTNAME', () => {
    const byName = readRmf(fileOf([table('MATRIX', matrixColumns()), table('EBOUNDS', eboundsColumns())])).data.ebounds;
    expect(Array.from(byName.eMaxKeV)).toEqual([1, 2, 3, 4]);
    const byClass = readRmf(fileOf([table('MATRIX', matrixColumns()), table('CHANBOUNDS', eboundsColumns(), classCards('RESPONSE', 'EBOUNDS'))])).data.ebounds;
    expect(Array.from(byClass.eMinKeV)).toEqual([0, 1, 2, 3]);
  });

  it('an EBOUNDS table without rows takes its first channel from TLMIN of CHANNEL (TLMINn, the legal minimum: FITS 4.0 §7.3.2 from memory, and CAL/GEN/92-002a)', () => {
    const empty = [{ name: 'CHANNEL', tform: '1J', tlmin: 0, tlmax: 3, data: [] }, { name: 'E_MIN', tform: '1E', data: [] }, { name: 'E_MAX', tform: '1E', data: [] }];
    expect(readRmf(fileOf([table('MATRIX', matrixColumns()), table('EBOUNDS', empty)])).data.ebounds.firstChannel).toBe(0);
  });

  it('DETCHANS as written; without it, the channel range TLMIN..TLMAX of F_CHAN (CAL/GEN/92-002a)', () => {
    expect(readRmf(fileOf([table('MATRIX', matrixColumns(), [{ keyword: 'DETCHANS', value: 1024 }])])).data.detchans).toBe(1024);
    for (const [tlmin, tlmax] of [[0, 15], [1, 16]]) {
      const range = readRmf(fileOf([table('MATRIX', matrixColumns({}, { tlmin, tlmax }))])).data;
      expect([range.firstChannel, range.detchans]).toEqual([tlmin, 16]);
    }
  });

  it('HDUCLAS3 absent is read as an empty class, not invented', () => {
    expect(readRmf(fileOf([table('MATRIX', matrixColumns())])).data.hduclas3).toBe('');
  });

  it('F_CHAN and N_CHAN as 64-bit integers (1PK or 1K; FITS 4.0 §7.3.5 allows any numeric type in a descriptor) read as the same groups', () => {
    const k = (name: string, cells: bigint[][]): ColumnInput => ({ name, tform: '1PK', data: cells.map((c) => BigInt64Array.from(c)) });
    const file = fileOf([table('MATRIX', matrixColumns({ F_CHAN: k('F_CHAN', [[1n], [2n, 4n]]), N_CHAN: k('N_CHAN', [[2n], [1n, 1n]]) }))]);
    expect(rowsOf(readRmf(file).data)).toEqual([[[1], [2], [0.5, 0.5]], [[2, 4], [1, 1], [0.25, 0.75]]]);
    // Scalar 64-bit F_CHAN/N_CHAN: one group per row.
    const scalar = fileOf([table('MATRIX', matrixColumns({
      N_GRP: { name: 'N_GRP', tform: '1I', data: [1, 1] },
      F_CHAN: { name: 'F_CHAN', tform: '1K', data: BigInt64Array.of(1n, 2n) },
      N_CHAN: { name: 'N_CHAN', tform: '1K', data: BigInt64Array.of(2n, 2n) },
    }))]);
    expect(rowsOf(readRmf(scalar).data)).toEqual([[[1], [2], [0.5, 0.5]], [[2], [2], [0.25, 0.75]]]);
  });

  it('rows are views of the decoded MATRIX cells, not copies (the documented memory saving of readRmf)', () => {
    const file = fileOf([table('MATRIX', matrixColumns())]);
    const cells = file.hdus[1].table!.values.get('MATRIX') as Float32Array[];
    const rows = readRmf(file).data.rows;
    expect(rows.map((r, i) => r.matrix.buffer === cells[i].buffer)).toEqual([true, true]);
  });
});

describe('readRmf: unreadable layouts name the table and column', () => {
  it('a missing column lists the columns found, or says none', () => {
    const e = inputError(() => readRmf(fileOf([table('MATRIX', matrixColumns({ N_GRP: null, F_CHAN: null, N_CHAN: null, MATRIX: null }))], { fileName: 'm.rmf' })));
    expect(e.message).toBe('missing column N_GRP');
    expect(e.where).toMatchObject({ file: 'm.rmf', field: 'HDU 1 (MATRIX)', expected: 'a N_GRP column in MATRIX (columns found: ENERG_LO, ENERG_HI)' });
    expect(inputError(() => readRmf(fileOf([table('MATRIX', [])]))).where.expected).toBe('a ENERG_LO column in MATRIX (columns found: none)');
    // A matrix table without EXTNAME (found by its class keywords) is named by its position.
    const unnamed = inputError(() => readRmf(fileOf([table('', [], classCards('RESPONSE', 'RSP_MATRIX'))])));
    expect(unnamed.where.expected).toBe('a ENERG_LO column in HDU 1 (columns found: none)');
  });

  it('a character column in MATRIX or EBOUNDS is named in the error', () => {
    const cases: [string, ReturnType<typeof fileOf>][] = [
      ...(['ENERG_LO', 'ENERG_HI', 'N_GRP', 'F_CHAN', 'N_CHAN', 'MATRIX'] as const).map((c): [string, ReturnType<typeof fileOf>] => [
        `HDU 1 (MATRIX) column ${c}`,
        fileOf([table('MATRIX', matrixColumns({ [c]: textColumn(c, 2) }))], { fileName: 'c.rmf' }),
      ]),
      ...(['CHANNEL', 'E_MIN', 'E_MAX'] as const).map((c): [string, ReturnType<typeof fileOf>] => [
        `HDU 2 (EBOUNDS) column ${c}`,
        fileOf([table('MATRIX', matrixColumns()), table('EBOUNDS', eboundsColumns({ [c]: textColumn(c, 4) }))], { fileName: 'c.rmf' }),
      ]),
    ];
    for (const [field, file] of cases) {
      const e = inputError(() => readRmf(file));
      expect(e.message).toBe(`column ${field.split(' ').at(-1)} is not numeric`);
      expect(e.where).toMatchObject({ file: 'c.rmf', field, expected: 'a numeric column (B, I, J, K, E or D)' });
    }
  });
});
