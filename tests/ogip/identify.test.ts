/**
 * identifyProduct: an OGIP product is known by its extension name or by its HDUCLASn keywords,
 * either suffices (OGIP CAL/GEN/92-002 for RMF and ARF, OGIP/92-007 for PHA; from memory). Each
 * route is checked alone, on in-memory files.
 */
import { describe, expect, it } from 'vitest';
import { identifyProduct } from '../../generators/ogip/index.ts';
import { classCards, fileOf, table } from './support/files.ts';

const cols = [{ name: 'X', tform: '1J', data: [1] }];

describe('identifyProduct', () => {
  it('by EXTNAME alone: MATRIX or SPECRESP MATRIX, SPECRESP, SPECTRUM', () => {
    expect(identifyProduct(fileOf([table('MATRIX', cols)]))).toBe('rmf');
    expect(identifyProduct(fileOf([table('SPECRESP MATRIX', cols)]))).toBe('rmf');
    expect(identifyProduct(fileOf([table('SPECRESP', cols)]))).toBe('arf');
    expect(identifyProduct(fileOf([table('SPECTRUM', cols)]))).toBe('pha');
  });

  it('by HDUCLAS1/HDUCLAS2 alone, under other extension names', () => {
    expect(identifyProduct(fileOf([table('RESP', cols, classCards('RESPONSE', 'RSP_MATRIX'))]))).toBe('rmf');
    expect(identifyProduct(fileOf([table('EFFAREA', cols, classCards('RESPONSE', 'SPECRESP'))]))).toBe('arf');
    expect(identifyProduct(fileOf([table('SPEC1', cols, classCards('SPECTRUM', 'TOTAL'))]))).toBe('pha');
  });

  it('class keywords in the primary header alone make no product: the primary HDU holds no table (FITS 4.0 §7: tables are extensions)', () => {
    for (const cards of [classCards('RESPONSE', 'RSP_MATRIX'), classCards('RESPONSE', 'SPECRESP'), classCards('SPECTRUM')]) {
      expect(identifyProduct(fileOf([], { primaryCards: cards }))).toBeNull();
    }
    expect(identifyProduct(fileOf([table('OTHER', cols)]))).toBeNull();
  });
});
