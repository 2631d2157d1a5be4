/**
 * Rows of a matrix computed in blocks (as threads compute them) and packed for transfer give the
 * matrix of the single-pass build, to the byte of its FITS file. The reference is the
 * single-pass build itself: a split must change nothing.
 */
import { describe, expect, it } from 'vitest';
import {
  assembleRedistribution,
  buildRedistribution,
  packRows,
  packedBuffers,
  prepareRedistribution,
  redistributionRows,
  unpackRows,
  type RedistributionInput,
} from '../../generators/response/index.ts';
import { escapeInputsFor } from '../../generators/physics/escape-inputs.ts';
import { writeRmf } from '../../generators/ogip/index.ts';
import { expandRow } from '../../generators/response/compress.ts';
import { CHANNELS, META, fullSpec } from './spec-fixtures.ts';

/** Si Kα energy, keV (X-ray data booklet, Table 1-2: 1.740 keV; from memory). */
const ESCAPE_KEV = 1.74;

/** Every component on (core, tail, shelf, Si escape and fluorescence, threshold), the table's silicon; 301 rows: prime, so no split is even. */
const INPUT: RedistributionInput = {
  spec: fullSpec(),
  lineFits: [],
  energy: { minKeV: 0.15, maxKeV: 11, bins: 301, spacing: 'log' },
  channels: CHANNELS,
  meta: META,
  silicon: escapeInputsFor('Si'),
};
const WHOLE = buildRedistribution(INPUT);
const WHOLE_BYTES = writeRmf(WHOLE.rmf);

describe('matrix rows in blocks', () => {
  it('the rows have the full line shape: an escape peak and a shelf far below the core (the split is tested on these)', () => {
    const i = WHOLE.rmf.energLoKeV.findIndex((e) => e > 6);
    const d = expandRow(WHOLE.rmf.rows[i], CHANNELS.count, CHANNELS.firstChannel);
    let peak = 0;
    d.forEach((v, j) => (v > d[peak] ? (peak = j) : 0));
    const widthKeV = CHANNELS.widthEv / 1000;
    const coreKeV = (peak + 0.5) * widthKeV;
    const mass = (loKeV: number, hiKeV: number) => d.reduce((s, v, j) => ((j + 0.5) * widthKeV >= loKeV && (j + 0.5) * widthKeV < hiKeV ? s + v : s), 0);
    // Si Kα escapes 1.74 keV below the core; 3 keV below (≈50 σ) only the shelf is left.
    const escape = mass(coreKeV - ESCAPE_KEV - 0.1, coreKeV - ESCAPE_KEV + 0.1);
    const shelf = mass(coreKeV - 3.1, coreKeV - 2.9);
    expect(shelf).toBeGreaterThan(0);
    expect(escape).toBeGreaterThan(5 * shelf);
    expect(WHOLE.rmf.rows[i].matrix.length).toBeGreaterThan(CHANNELS.count / 2);
  });

  it('uneven blocks, an empty block included, assemble to the same FITS bytes, losses and element count', () => {
    const p = prepareRedistribution(INPUT);
    for (const cuts of [[0, 301], [0, 100, 301], [0, 0, 7, 150, 151, 301], [0, 300, 301]]) {
      const blocks = cuts.slice(1).map((end, k) => redistributionRows(p, cuts[k], end));
      const r = assembleRedistribution(p, blocks);
      expect(Buffer.from(writeRmf(r.rmf)).equals(Buffer.from(WHOLE_BYTES))).toBe(true);
      expect(r.nnz).toBe(WHOLE.nnz);
      expect(r.losses).toEqual(WHOLE.losses);
    }
  });

  it('packed and unpacked (rows become views into shared buffers), the blocks give the same FITS bytes', () => {
    const p = prepareRedistribution(INPUT);
    const packed = [redistributionRows(p, 0, 123), redistributionRows(p, 123, 301)].map((b) => packRows(b));
    // Transfer takes whole buffers: each packed array must own its buffer, not share one.
    for (const k of packed) expect(packedBuffers(k).every((b, _, all) => all.filter((x) => x === b).length === 1)).toBe(true);
    const r = assembleRedistribution(p, packed.map(unpackRows));
    expect(r.rmf.rows[200].matrix.buffer).toBe(packed[1].matrix.buffer);
    expect(Buffer.from(writeRmf(r.rmf)).equals(Buffer.from(WHOLE_BYTES))).toBe(true);
    expect(r.losses).toEqual(WHOLE.losses);
  });

  it('refuses packed rows whose counts do not add up, blocks that do not cover the matrix, and rows outside it', () => {
    const p = prepareRedistribution(INPUT);
    const packed = packRows(redistributionRows(p, 0, 10));
    expect(() => unpackRows({ ...packed, elementsPerRow: packed.elementsPerRow.map((v, i) => (i === 3 ? v + 1 : v)) })).toThrow(/do not add up/);
    expect(() => unpackRows({ ...packed, droppedByCut: packed.droppedByCut.subarray(1) })).toThrow(/do not add up/);
    expect(() => assembleRedistribution(p, [redistributionRows(p, 0, 300)])).toThrow(/hold 300 rows; the matrix has 301/);
    expect(() => redistributionRows(p, 200, 302)).toThrow(RangeError);
    expect(() => redistributionRows(p, 5, 4)).toThrow(RangeError);
  });
});
