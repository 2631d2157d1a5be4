/**
 * The finder's manifest and chunks (generators/site-data/finder.ts) and the page's lookup through
 * them (src/lib/finder.ts). The reference for every answer is findFiles on the whole release index,
 * the contract's rule (generators/site-data/types.ts; its own checks are in finder.test.ts): the
 * chunks must hold exactly a detector's files, never more than the bound, and a lookup through the
 * manifest and the chunks it chooses must give the same files in the same order. Inputs: hand-made
 * indexes (expected values by inspection) and the bench's synthetic index (bench/finder.ts).
 */
import { describe, expect, it } from 'vitest';
import { finderDocuments, mergeSpans, packRuns } from '../../generators/site-data/finder.ts';
import type { FinderChunkDoc, FinderManifestDoc, ProductSummary, ReleaseIndex, ReleaseSummary } from '../../generators/site-data/types.ts';
import { asChunk, chunkCovers, chunksFor, FINDER_STEP_CHUNKS, findFiles, findInChunks, lookupStep, startLookup, type FinderPosition } from '../../src/lib/finder.ts';
import { syntheticIndex } from '../../bench/finder.ts';

const product = (id: string, detector: string, extra: Partial<ProductSummary> = {}): ProductSummary => ({ id, kind: 'rmf', detector, epoch: 'all', path: `files/${id}.gz`, bytes: 1, sha256: 'a'.repeat(64), validFrom: '2026-01-01', validTo: null, ...extra });
const summary = (id: string, ps: ProductSummary[], extra: Partial<ReleaseSummary> = {}): ReleaseSummary => ({ id, instrument: 'inst', key: id, supersedesKey: null, title: '', date: '2026-01-01', status: 'published', validFrom: '2026-01-01', validTo: null, supersedes: null, checks: { pass: 0, fail: 0, warn: 0, review: 0 }, products: ps, ...extra });
const instrument = (dets: string[], configurations?: { id: string; title: string; filter: string }[]): ReleaseIndex['instruments'][number] => ({ id: 'inst', telescope: '', instrument: '', title: '', description: '', channels: 1, detectors: dets.map((id) => ({ id, name: id, kind: '', description: '' })), ...(configurations ? { configurations } : {}) });

type Docs = ReturnType<typeof finderDocuments>;
const manifestOf = (docs: Docs, detector: string) => docs.find((d) => (d.doc as FinderManifestDoc).schema === 'kiln/finder-manifest/1' && (d.doc as FinderManifestDoc).detector === detector)!.doc as FinderManifestDoc;
const chunksOf = (docs: Docs, m: FinderManifestDoc) => m.chunks.map((c) => docs.find((d) => d.path === c.path)!.doc as FinderChunkDoc);
const key = (h: { release: { key: string }; product: { path: string } }) => `${h.release.key}/${h.product.path}`;

describe('finder documents of a small index', () => {
  const products = [product('a-rmf', 'a'), product('a-e1-arf', 'a', { kind: 'arf', epoch: 'e1' }), product('b-rmf', 'b')];
  const index: ReleaseIndex = { schema: 'kiln/release-index/1', instruments: [instrument(['a', 'b'])], releases: [summary('2.0.0', [products[0]], { supersedes: '1.0.0' }), summary('1.0.0', products, { status: 'superseded' })] };
  const docs = finderDocuments(index);

  it('a manifest per detector and its chunks, each detector with only its files, releases without any left out', () => {
    expect(docs.map((d) => d.path)).toEqual(['finder/inst/a.json', 'finder/inst/a/0.json', 'finder/inst/b.json', 'finder/inst/b/0.json']);
    const b = chunksOf(docs, manifestOf(docs, 'b'));
    expect(b.flatMap((c) => c.releases.map((r) => [r.id, r.products.map((p) => p.path)]))).toEqual([['1.0.0', ['files/b-rmf.gz']]]);
    expect(manifestOf(docs, 'a')).toMatchObject({ schema: 'kiln/finder-manifest/1', instrument: 'inst', detector: 'a', products: 3, chunks: [{ path: 'finder/inst/a/0.json', products: 3, releases: ['2.0.0', '1.0.0'], spans: [['2026-01-01', null]], allNodes: true, allRowBands: true }] });
  });

  it('a superseded release names its successor, even when that one is in another chunk', () => {
    const one = finderDocuments(index, 1);
    const m = manifestOf(one, 'a');
    expect(m.chunks.map((c) => c.releases)).toEqual([['2.0.0'], ['1.0.0'], ['1.0.0']]);
    const hits = findInChunks(chunksOf(one, m), '2026-06-01');
    expect(hits.map((h) => [h.release.id, h.product.kind, h.warning])).toEqual([
      ['2.0.0', 'rmf', null],
      ['1.0.0', 'rmf', 'Release 1.0.0 is superseded by 2.0.0.'],
      ['1.0.0', 'arf', 'Release 1.0.0 is superseded by 2.0.0.'],
    ]);
    expect(hits.map((h) => h.warning)).toEqual(findFiles(index, 'a', '2026-06-01').map((h) => h.warning));
  });

  it('keeps a file\'s path, size and SHA-256, and states detector and filter once per document, not per file', () => {
    const conf = [{ id: 'thin', title: 'Thin', filter: 'THIN' }, { id: 'thick', title: 'Thick', filter: 'THICK' }];
    const configured: ReleaseIndex = { schema: 'kiln/release-index/1', instruments: [instrument(['s'], conf)], releases: [summary('1.0.0', [product('s.thin-rmf', 's.thin', { filter: 'thin', validEnergyKeV: [0.2, 12], validChannels: [1, 9] }), product('s.thick-rmf', 's.thick', { filter: 'thick' })])] };
    const cdocs = finderDocuments(configured);
    expect(cdocs.map((d) => d.path)).toEqual(['finder/inst/s.thin.json', 'finder/inst/s.thin/0.json', 'finder/inst/s.thick.json', 'finder/inst/s.thick/0.json']);
    const c = cdocs[1].doc as FinderChunkDoc;
    expect(c).toMatchObject({ schema: 'kiln/finder-chunk/1', detector: 's.thin', filter: 'thin', chunk: 0 });
    expect(c.releases).toEqual([{ id: '1.0.0', key: '1.0.0', status: 'published', date: '2026-01-01', products: [{ kind: 'rmf', epoch: 'all', path: 'files/s.thin-rmf.gz', bytes: 1, sha256: 'a'.repeat(64), validFrom: '2026-01-01', validTo: null }] }]);
    // The page's hit still knows its entry and configuration (from the document).
    expect(findInChunks([c], '2026-06-01')[0].product).toMatchObject({ detector: 's.thin', filter: 'thin' });
  });
});

describe('spans and packing', () => {
  it('mergeSpans joins overlapping and touching validities ([from, to), null = open) and keeps gaps', () => {
    expect(mergeSpans([['2027-01-01', '2028-01-01'], ['2026-01-01', '2027-01-01'], ['2030-01-01', null], ['2031-01-01', '2032-01-01']])).toEqual([['2026-01-01', '2028-01-01'], ['2030-01-01', null]]);
    expect(mergeSpans([['2026-01-01', '2026-06-01'], ['2026-06-02', '2027-01-01']])).toEqual([['2026-01-01', '2026-06-01'], ['2026-06-02', '2027-01-01']]);
    expect(mergeSpans([['2026-01-01T12:00:00', '2026-03-01'], ['2026-02-01', '2026-04-01']])).toEqual([['2026-01-01', '2026-04-01']]);
  });
  it('packRuns keeps runs whole where they fit and cuts only a run longer than a chunk', () => {
    const runs = [[1, 2, 3], [4, 5], [6, 7, 8, 9, 10, 11, 12], [13]];
    expect(packRuns(runs, 5)).toEqual([[1, 2, 3, 4, 5], [6, 7, 8, 9, 10], [11, 12, 13]]);
    expect(packRuns(runs, 12)).toEqual([[1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12], [13]]);
  });
});

// Bounds: 256 (the build's), 44 (exactly one release of one detector: 32 region RMFs and 12 ARFs
// in the synthetic index), 20 (every release cut in three, a shared tail).
const BOUNDS = [256, 44, 20];
const RELEASES = 12;
/**
 * The synthetic index lists releases and files in the finder's order already; this one does not:
 * newest release a candidate, an older one published, one withdrawn and one a draft, and the
 * area files listed before the matrices.
 */
function mixedIndex(): ReleaseIndex {
  const index = syntheticIndex(RELEASES, 'open');
  const status: Record<number, ReleaseSummary['status']> = { 0: 'candidate', 2: 'withdrawn', 3: 'published', 4: 'draft' };
  return { ...index, releases: index.releases.map((r, i) => ({ ...r, status: status[i] ?? r.status, products: [...r.products].reverse() })) };
}
const PATTERNS = [
  ['sequential', () => syntheticIndex(RELEASES, 'sequential')],
  ['open', () => syntheticIndex(RELEASES, 'open')],
  ['open, statuses and file order mixed', mixedIndex],
] as const;

describe.each(PATTERNS)('synthetic index, %s validities', (_name, make) => {
  const index = make();
  const dets = index.instruments[0].detectors.map((d) => d.id);

  describe.each(BOUNDS)('at most %i files per chunk', (bound) => {
    const docs = finderDocuments(index, bound);

    it('the chunks of a detector hold exactly its files, each once, as the index states them, within the bound', () => {
      for (const det of dets) {
        const m = manifestOf(docs, det);
        const chunks = chunksOf(docs, m);
        const inChunks = chunks.flatMap((c) => c.releases.flatMap((r) => r.products.map((p) => ({ key: r.key, ...p }))));
        const inIndex = index.releases.flatMap((r) => r.products.filter((p) => p.detector === det).map((p) => ({ key: r.key, kind: p.kind, ...(p.node ? { node: p.node } : {}), ...(p.rowBand ? { rowBand: p.rowBand } : {}), epoch: p.epoch, path: p.path, bytes: p.bytes, sha256: p.sha256, validFrom: p.validFrom, validTo: p.validTo })));
        const sort = (xs: object[]) => xs.map((x) => JSON.stringify(x)).sort();
        expect(sort(inChunks)).toEqual(sort(inIndex));
        expect(m.products).toBe(inIndex.length);
        for (const [k, c] of chunks.entries()) {
          const n = c.releases.reduce((s, r) => s + r.products.length, 0);
          expect(n).toBeLessThanOrEqual(bound);
          expect(m.chunks[k].products).toBe(n);
          expect(c.chunk).toBe(k);
        }
        // A release that fits in a chunk is in one chunk only.
        for (const r of index.releases) {
          const n = r.products.filter((p) => p.detector === det).length;
          if (n <= bound) expect(m.chunks.filter((c) => c.releases.includes(r.key))).toHaveLength(1);
        }
      }
    });

    it('each manifest entry labels its chunk exactly: releases, merged validity, nodes and row bands', () => {
      const m = manifestOf(docs, dets[1]);
      for (const [k, c] of chunksOf(docs, m).entries()) {
        const ps = c.releases.flatMap((r) => r.products);
        const label = m.chunks[k];
        expect(label.releases).toEqual(c.releases.map((r) => r.key));
        expect(label.spans).toEqual(mergeSpans(ps.map((p) => [p.validFrom, p.validTo])));
        expect(label.nodes ?? []).toEqual([...new Set(ps.flatMap((p) => (p.node ? [p.node] : [])))].sort());
        expect(label.rowBands ?? []).toEqual([...new Set(ps.flatMap((p) => (p.rowBand ? [p.rowBand] : [])))].sort());
        expect(label.allNodes === true).toBe(ps.some((p) => p.node === undefined));
      }
    });

    it('a lookup through the manifest and its chunks gives the whole-index answer, its first step the leading part of it, and skips no chunk with a hit', async () => {
      let seed = 7;
      const rnd = () => (seed = (seed * 48271) % 2147483647) / 2147483647;
      const det = dets[2];
      const m = manifestOf(docs, det);
      const byPath = new Map(docs.map((d) => [d.path, d.doc]));
      const fetchChunk = async (c: { path: string }) => byPath.get(c.path);
      const first = Date.UTC(2025, 11, 1);
      const spanMs = (RELEASES + 10) * 90 * 86_400_000;
      for (let q = 0; q < 120; q++) {
        const date = new Date(first + rnd() * spanMs).toISOString().slice(0, 10);
        const at: FinderPosition = q % 3 === 0 ? {} : { node: 'abcdefgh'[Math.floor(rnd() * 8)], rowBand: q % 3 === 1 ? `r${1 + Math.floor(rnd() * 4)}` : null };
        const whole = findFiles(index, det, date, at).map(key);
        const step = await lookupStep(m, startLookup(m, date, at), fetchChunk, date, at);
        expect(step.loaded.length).toBeLessThanOrEqual(FINDER_STEP_CHUNKS);
        expect(step.hits.map(key)).toEqual(whole.slice(0, step.hits.length));
        if (whole.length) expect(step.hits.length).toBeGreaterThan(0);
        // The first step shows every file of the recommended release for this position.
        const best = whole[0]?.slice(0, whole[0].indexOf('/files/'));
        expect(step.hits.map(key).filter((k) => k.startsWith(`${best}/files/`))).toEqual(whole.filter((k) => k.startsWith(`${best}/files/`)));
        let all = step;
        while (all.loaded.length < all.candidates.length) all = await lookupStep(m, all, fetchChunk, date, at);
        expect(all.hits.map(key)).toEqual(whole);
        // The chunks the manifest ruled out hold no hit.
        const skipped = chunksOf(docs, m).filter((_, k) => !chunkCovers(m.chunks[k], date, at));
        expect(findInChunks(skipped, date, at)).toEqual([]);
      }
    });
  });
});

describe('a lookup with a bad or missing chunk fails loudly', () => {
  const index = syntheticIndex(4, 'open');
  const docs = finderDocuments(index, 44);
  const m = manifestOf(docs, 'd0');
  const good = chunksOf(docs, m);

  it('asChunk refuses another document or another chunk, naming the file', () => {
    expect(() => asChunk({ schema: 'kiln/finder-manifest/1' }, m, 0)).toThrow(/^file list finder\/bench-cam\/d0\/0\.json: not a finder chunk \(schema kiln\/finder-manifest\/1, expected kiln\/finder-chunk\/1\)$/);
    expect(() => asChunk(good[1], m, 0)).toThrow(/holds bench-cam\/d0 chunk 1, expected bench-cam\/d0 chunk 0/);
    expect(() => asChunk(null, m, 0)).toThrow(/not a finder chunk/);
    expect(asChunk(good[0], m, 0)).toBe(good[0]);
  });

  it('a failed fetch rejects the step instead of answering with what was found so far', async () => {
    const state = startLookup(m, '2026-06-01');
    expect(state.candidates.length).toBe(4);
    await expect(lookupStep(m, state, async () => Promise.reject(new Error('finder/bench-cam/d0/0.json: HTTP 404')), '2026-06-01')).rejects.toThrow(/HTTP 404/);
    await expect(lookupStep(m, state, async (c) => (c.path.endsWith('/0.json') ? { schema: 'kiln/finder-chunk/1', instrument: 'bench-cam', detector: 'd0', chunk: 0 } : undefined), '2026-06-01')).rejects.toThrow(/field releases missing/);
  });

  it('chunksFor keeps the manifest order and drops chunks outside the date', () => {
    expect(chunksFor(m, '2025-12-31')).toEqual([]);
    expect(chunksFor(m, '2026-06-01')).toEqual(m.chunks);
  });
});
