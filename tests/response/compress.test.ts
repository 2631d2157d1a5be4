import { describe, expect, it } from 'vitest';
import { compressRow, countElements, cutForBudget, expandRow } from '../../generators/response/compress.ts';

describe('OGIP grouping of a row (CAL/GEN/92-002: N_GRP, F_CHAN, N_CHAN, MATRIX)', () => {
  it('forms one group per run of elements ≥ cut, channels numbered from firstChannel', () => {
    const prob = Float64Array.of(0, 1e-12, 0.2, 0.3, 1e-12, 0, 0.4, 0.1, 1e-9);
    const { row, dropped } = compressRow(prob, 1e-10, 1);
    expect(Array.from(row.fChan)).toEqual([3, 7]);
    expect(Array.from(row.nChan)).toEqual([2, 3]);
    expect(Array.from(row.matrix)).toEqual([0.2, 0.3, 0.4, 0.1, 1e-9].map(Math.fround));
    expect(dropped).toBeCloseTo(2e-12, 20);
  });

  it('keeps trailing runs, and expandRow inverts the grouping', () => {
    const prob = Float64Array.of(0.5, 0, 0.25, 0.25);
    const { row } = compressRow(prob, 1e-6, 0);
    expect(Array.from(row.fChan)).toEqual([0, 2]);
    expect(Array.from(row.nChan)).toEqual([1, 2]);
    expect(Array.from(expandRow(row, 4, 0))).toEqual([0.5, 0, 0.25, 0.25]);
    expect(countElements([row, row])).toBe(6);
  });

  it('the default cut bounds the dropped probability per row by the budget', () => {
    const n = 4096;
    const cut = cutForBudget(n, 1e-5);
    // worst case: every element just below the cut
    const prob = new Float64Array(n).fill(cut * 0.999999);
    expect(compressRow(prob, cut, 0).dropped).toBeLessThan(1e-5);
  });
});
