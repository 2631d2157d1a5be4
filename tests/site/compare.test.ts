/** Compare helpers: expected values worked out by hand in the comments. */
import { describe, expect, it } from 'vitest';
import type { ParameterRow } from '../../generators/site-data/types.ts';
import { defaultPair, difference, onGrid, pairEpochs, parameterChanges, ratio, splitValidationDiff, validationDiff } from '../../src/lib/compare/index.ts';
import type { EpochSite } from '../../generators/site-data/types.ts';

describe('onGrid', () => {
  it('returns B unchanged on an equal grid, null outside its range', () => {
    expect(onGrid([1, 2, 4], [1, 2, 4], [10, 20, 40])).toEqual([10, 20, 40]);
    expect(onGrid([0.5, 1, 8], [1, 2, 4], [10, 20, 40])).toEqual([null, 10, null]);
  });
  it('interpolates linearly in log energy', () => {
    // Between (1, 10) and (4, 40): x = 2 is halfway in log x → 25.
    expect(onGrid([2], [1, 4], [10, 40])[0]).toBeCloseTo(25, 12);
  });
});

describe('ratio and difference', () => {
  it('skip nulls and zero denominators', () => {
    expect(ratio([2, 0, null, 4], [3, 1, 1, null])).toEqual([1.5, null, null, null]);
    expect(difference([2, 0, null], [3, 1, 1])).toEqual([1, 1, null]);
  });
});

const row = (name: string, value: number, uncertainty: number | null, detector: string | null = 'd0'): ParameterRow => ({ detector, group: 'g', name, symbol: null, unit: 'eV', value, uncertainty, source: 'fit' });

describe('parameterChanges', () => {
  it('gives Δ and Δ over the quadrature sum of the 1σ errors, changed rows first', () => {
    const pc = parameterChanges([row('same', 1, 0.1), row('moved', 10, 0.3)], [row('same', 1, 0.1), row('moved', 10.5, 0.4), row('new', 2, null)]);
    expect(pc.map((p) => p.name)).toEqual(['moved', 'new', 'same']);
    expect(pc[0].delta).toBeCloseTo(0.5, 12);
    expect(pc[0].deltaSigma).toBeCloseTo(0.5 / 0.5, 12); // hypot(0.3, 0.4) = 0.5
    expect(pc[1].a).toBeNull();
    expect(pc[2].changed).toBe(false);
  });
});

describe('validationDiff and defaultPair', () => {
  const c = (id: string, status: 'pass' | 'fail', measured: number) => ({ id, title: id, product: null, status, measured, tolerance: 1, unit: null, message: '' });
  it('lists changed, removed and added checks', () => {
    const d = validationDiff(
      { schema: 'kiln/validation/1', release: 'a', checks: [c('x', 'pass', 1), c('y', 'pass', 1), c('gone', 'pass', 1)] },
      { schema: 'kiln/validation/1', release: 'b', checks: [c('x', 'pass', 1), c('y', 'fail', 2), c('new', 'pass', 1)] },
    );
    expect(d.map((x) => x.id)).toEqual(['y', 'gone', 'new']);
  });
  it('pairs the newest release with the one it supersedes', () => {
    expect(defaultPair([{ id: '3', supersedes: '1' }, { id: '2', supersedes: '1' }, { id: '1', supersedes: null }])).toEqual(['1', '3']);
    expect(defaultPair([{ id: '2', supersedes: null }, { id: '1', supersedes: null }])).toEqual(['1', '2']);
    expect(defaultPair([{ id: '1', supersedes: null }])).toBeNull();
  });
});

const ep = (id: string, date: string, validFrom: string, validTo: string | null): EpochSite => ({ id, date, validFrom, validTo, energyKeV: [], mirrorCm2: [], components: [], detectorQE: [], effectiveAreaCm2: [] });

describe('pairEpochs', () => {
  it('pairs each B epoch with the A epoch in force on its reference date', () => {
    // A: launch valid from 2026-05-12 on (open) → every B epoch falls inside it.
    const a = [ep('launch', '2026-06-01', '2026-05-12', null)];
    const b = [ep('e1', '2026-08-01', '2026-05-12', '2026-11-01'), ep('e2', '2027-01-15', '2026-11-01', null)];
    expect(pairEpochs(a, b).map((p) => [p.b.id, p.a.id, p.how])).toEqual([['e1', 'launch', 'in force'], ['e2', 'launch', 'in force']]);
  });
  it('sets a new epoch against the open-ended one it follows, else same id, else nearest date', () => {
    // A: e1 [2026-05-12, 2026-11-01), e2 [2026-11-01, open). B adds e3 on 2027-07-15 → inside A's e2.
    const a = [ep('e1', '2026-08-01', '2026-05-12', '2026-11-01'), ep('e2', '2027-01-15', '2026-11-01', null)];
    const b = [ep('e1', '2026-08-01', '2026-05-12', '2026-11-01'), ep('e3', '2027-07-15', '2027-05-01', null)];
    expect(pairEpochs(a, b).map((p) => p.a.id)).toEqual(['e1', 'e2']);
    // Before every A epoch: e0 on 2026-01-01 has no covering A epoch and no same id → nearest is e1.
    expect(pairEpochs(a, [ep('e0', '2026-01-01', '2026-01-01', '2026-05-12')])[0]).toMatchObject({ how: 'nearest', a: { id: 'e1' } });
  });
});

describe('splitValidationDiff', () => {
  const c = (id: string, product: string | null, status: 'pass' | 'fail' | 'review', measured: number) => ({ id, title: id, product, status, measured, tolerance: 1, unit: null, message: '' });
  it('folds the checks of a product present on one side only, puts flipped results first', () => {
    // A has products p and gone; B has p and new. On p: x moves (pass → pass), y flips (pass → fail).
    const d = splitValidationDiff(
      { schema: 'kiln/validation/1', release: 'a', checks: [c('x', 'p', 'pass', 1), c('y', 'p', 'pass', 1), c('k', 'gone', 'pass', 1)] },
      { schema: 'kiln/validation/1', release: 'b', checks: [c('x', 'p', 'pass', 2), c('y', 'p', 'fail', 1), c('k', 'new', 'pass', 1), c('m', 'new', 'review', 1)] },
    );
    expect(d.both.map((x) => x.id)).toEqual(['y', 'x']);
    expect(d.onlyA).toEqual([{ product: 'gone', checks: [expect.objectContaining({ id: 'k' })] }]);
    expect(d.onlyB.map((g) => [g.product, g.checks.map((x) => x.id)])).toEqual([['new', ['k', 'm']]]);
  });
  it('keeps a check missing from a product that both releases have in the table', () => {
    const d = splitValidationDiff(
      { schema: 'kiln/validation/1', release: 'a', checks: [c('x', 'p', 'pass', 1), c('z', 'p', 'pass', 1)] },
      { schema: 'kiln/validation/1', release: 'b', checks: [c('x', 'p', 'pass', 1)] },
    );
    expect(d.both.map((x) => [x.id, x.b])).toEqual([['z', null]]);
    expect(d.onlyA).toEqual([]);
  });
});
