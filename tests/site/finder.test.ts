/**
 * The finder's rule is the contract's (generators/site-data/types.ts): a product applies to
 * observation dates in [validFrom, validTo), validTo null = open; published before candidate;
 * superseded and withdrawn releases are listed with a warning, drafts never.
 */
import { describe, expect, it } from 'vitest';
import type { ProductSummary, ReleaseIndex, ReleaseStatus, ReleaseSummary } from '../../generators/site-data/types.ts';
import { coversDate, findFiles, regionsOf } from '../../src/lib/finder.ts';
import { currentRelease } from '../../src/lib/status.ts';

const prod = (det: string, from: string, to: string | null, kind: 'rmf' | 'arf' = 'arf'): ProductSummary => ({
  id: `${det}-${from}-${kind}`, kind, detector: det, epoch: 'e', path: `files/${det}.${kind}.gz`, bytes: 1, sha256: '0'.repeat(64), validFrom: from, validTo: to,
});
const rel = (id: string, status: ReleaseStatus, date: string, products: ProductSummary[], supersedes: string | null = null): ReleaseSummary => ({
  id, instrument: 'x', key: id, supersedesKey: supersedes, title: id, date, status, validFrom: '2020-01-01', validTo: null, supersedes, checks: { pass: 0, fail: 0, warn: 0, review: 0 }, products,
});
const index: ReleaseIndex = {
  schema: 'kiln/release-index/1',
  instruments: [],
  releases: [
    rel('4', 'draft', '2025-06-01', [prod('d0', '2020-01-01', null)]),
    rel('3', 'candidate', '2025-05-01', [prod('d0', '2020-01-01', null)], '2'),
    rel('2', 'published', '2025-01-01', [prod('d0', '2020-01-01', '2024-01-01'), prod('d0', '2024-01-01', null), prod('d1', '2020-01-01', null)], '1'),
    rel('1', 'superseded', '2024-01-01', [prod('d0', '2020-01-01', null)]),
    rel('0', 'withdrawn', '2023-01-01', [prod('d0', '2020-01-01', null)]),
  ],
};

describe('coversDate', () => {
  it('includes validFrom and excludes validTo', () => {
    const p = prod('d0', '2024-01-01', '2025-01-01');
    expect(coversDate(p, '2024-01-01')).toBe(true);
    expect(coversDate(p, '2024-12-31')).toBe(true);
    expect(coversDate(p, '2025-01-01')).toBe(false);
    expect(coversDate(p, '2023-12-31')).toBe(false);
    expect(coversDate(prod('d0', '2024-01-01', null), '2099-01-01')).toBe(true);
  });
});

describe('findFiles', () => {
  it('orders published > candidate > superseded > withdrawn and skips drafts', () => {
    const hits = findFiles(index, 'd0', '2024-06-01');
    expect(hits.map((h) => h.release.id)).toEqual(['2', '3', '1', '0']);
    expect(hits[0].product.validFrom).toBe('2024-01-01');
  });
  it('warns on superseded and withdrawn releases only', () => {
    const w = Object.fromEntries(findFiles(index, 'd0', '2024-06-01').map((h) => [h.release.id, h.warning]));
    expect(w['2']).toBeNull();
    expect(w['3']).toBeNull();
    expect(w['1']).toMatch(/superseded by 2/);
    expect(w['0']).toMatch(/withdrawn/);
  });
  it('picks the epoch product covering the date', () => {
    const early = findFiles(index, 'd0', '2023-06-01').filter((h) => h.release.id === '2');
    expect(early.map((h) => h.product.validTo)).toEqual(['2024-01-01']);
  });
  it('returns nothing for another detector or before any validity', () => {
    expect(findFiles(index, 'd9', '2024-06-01')).toEqual([]);
    expect(findFiles(index, 'd0', '2019-12-31')).toEqual([]);
  });
});

describe('currentRelease', () => {
  it('is the newest published, else the newest candidate', () => {
    expect(currentRelease(index.releases, 'd0')?.id).toBe('2');
    expect(currentRelease([index.releases[0], index.releases[1]], 'd0')?.id).toBe('3');
    expect(currentRelease([index.releases[3]], 'd0')).toBeNull();
  });
});

describe('findFiles at a position on the detector (readout node, row band)', () => {
  // A release built per node: one matrix per node, the ARFs for the whole detector; an older
  // release built per detector. Invented fixture; the rule is the contract's (types.ts).
  const node = (n: string, rowBand?: string): ProductSummary => ({ ...prod('d0', '2020-01-01', null, 'rmf'), id: `d0-${n}${rowBand ?? ''}-rmf`, path: `files/d0-${n}${rowBand ?? ''}.rmf.gz`, node: n, ...(rowBand ? { rowBand } : {}) });
  const regional: ReleaseIndex = {
    schema: 'kiln/release-index/1',
    instruments: [],
    releases: [rel('2', 'published', '2025-01-01', [node('a'), node('b'), node('b', 'r2'), prod('d0', '2020-01-01', null)]), rel('1', 'superseded', '2024-01-01', [prod('d0', '2020-01-01', null, 'rmf'), prod('d0', '2020-01-01', null)])],
  };
  const ids = (at: Parameters<typeof findFiles>[3]) => findFiles(regional, 'd0', '2024-06-01', at).map((h) => `${h.release.id}:${h.product.id}`);

  it('a node picks its own matrix and every whole-detector file, never another node\'s matrix', () => {
    expect(ids({ node: 'a' })).toEqual(['2:d0-a-rmf', '2:d0-2020-01-01-arf', '1:d0-2020-01-01-rmf', '1:d0-2020-01-01-arf']);
    expect(ids({ node: 'b', rowBand: 'r2' })).toEqual(['2:d0-b-rmf', '2:d0-br2-rmf', '2:d0-2020-01-01-arf', '1:d0-2020-01-01-rmf', '1:d0-2020-01-01-arf']);
  });
  it('"any" position lists every region\'s matrix', () => {
    expect(ids({})).toHaveLength(6);
    expect(ids({ node: null, rowBand: null })).toEqual(ids({}));
  });
  it('regionsOf lists the nodes and row bands some product is made for', () => {
    expect(regionsOf(regional, 'd0')).toEqual({ nodes: ['a', 'b'], rowBands: ['r2'] });
    expect(regionsOf(regional, 'd1')).toEqual({ nodes: [], rowBands: [] });
  });
});
