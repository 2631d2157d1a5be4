/**
 * The finder's documents: per instrument and detector entry, a small manifest and chunks of at
 * most FINDER_CHUNK_PRODUCTS files each, so what the finder page fetches stays bounded however
 * many releases a mission publishes and however many readout regions a release is built for.
 *
 * A detector's files are put in the finder's order of preference (status, then newest release,
 * then the matrix before the area file; ties in index order) and cut into chunks, whole releases
 * where they fit. The hits of any leading run of chunks are then the leading hits of all of them,
 * so the page can stop at the first chunks that answer and load older releases on demand. Each
 * manifest entry says which dates (merged validity spans) and which nodes and row bands its chunk
 * holds, so the page fetches only the chunks that can hold a file for the asked date and position.
 * Pure, browser-safe.
 */
import { finderChunkPath, finderPath } from './paths.ts';
import type { FinderChunk, FinderChunkDoc, FinderManifestDoc, FinderProduct, FinderRelease, ProductKind, ProductSummary, ReleaseIndex, ReleaseStatus, ReleaseSummary } from './types.ts';
import type { SiteDocument } from './split.ts';

/**
 * Files per chunk. A file's entry is ~200 B of JSON (its SHA-256 alone is 64), so a chunk stays
 * near 50 KB and a lookup's first step (manifest and at most FINDER_STEP_CHUNKS chunks) well under
 * the 300 KB page budget (README, performance).
 */
export const FINDER_CHUNK_PRODUCTS = 256;

/** Preference when several releases cover the same date: published first (drafts are never offered). */
export const STATUS_PREFERENCE: ReleaseStatus[] = ['published', 'candidate', 'superseded', 'withdrawn', 'draft'];
export const statusRank = (s: ReleaseStatus): number => STATUS_PREFERENCE.indexOf(s);
/** Order of the kinds within a release: the matrix (or combined response) first, then the ARF. */
export const KIND_ORDER: ProductKind[] = ['rsp', 'rmf', 'arf'];

/** ISO dates (YYYY-MM-DD) compare correctly as strings; longer timestamps are cut to the date. */
export const day = (s: string): string => s.slice(0, 10);

interface Item {
  release: ReleaseSummary;
  product: ProductSummary;
}

/** Finder order: status preference, newest release date first, matrix before area file. */
export const preference = (a: { release: { status: ReleaseStatus; date: string }; product: { kind: ProductKind } }, b: typeof a): number =>
  statusRank(a.release.status) - statusRank(b.release.status) || b.release.date.localeCompare(a.release.date) || KIND_ORDER.indexOf(a.product.kind) - KIND_ORDER.indexOf(b.product.kind);

/** Validity intervals [from, to) merged where they overlap or touch; to null = open. */
export function mergeSpans(spans: readonly (readonly [string, string | null])[]): [string, string | null][] {
  const sorted = spans.map(([f, t]) => [day(f), t === null ? null : day(t)] as [string, string | null]).sort((a, b) => a[0].localeCompare(b[0]));
  const out: [string, string | null][] = [];
  for (const [f, t] of sorted) {
    const last = out[out.length - 1];
    if (last && (last[1] === null || f <= last[1])) {
      if (last[1] !== null && (t === null || t > last[1])) last[1] = t;
    } else out.push([f, t]);
  }
  return out;
}

/** A product as the finder keeps it: what the page shows and what identifies the file (path, size, SHA-256). */
function finderProduct(p: ProductSummary): FinderProduct {
  return {
    kind: p.kind,
    ...(p.node !== undefined ? { node: p.node } : {}),
    ...(p.rowBand !== undefined ? { rowBand: p.rowBand } : {}),
    epoch: p.epoch,
    path: p.path,
    bytes: p.bytes,
    sha256: p.sha256,
    validFrom: p.validFrom,
    validTo: p.validTo,
  };
}

/** Leading runs of items cut into chunks of at most `max`, runs kept whole where they fit. */
export function packRuns<T>(runs: readonly T[][], max: number): T[][] {
  const chunks: T[][] = [];
  let cur: T[] = [];
  for (const run of runs) {
    if (cur.length && cur.length + run.length > max) {
      chunks.push(cur);
      cur = [];
    }
    // A run longer than a chunk (a release with many regions) is cut; its tail may be shared.
    for (let k = 0; k < run.length; k += max) {
      const piece = run.slice(k, k + max);
      if (cur.length + piece.length > max) {
        chunks.push(cur);
        cur = [];
      }
      cur.push(...piece);
    }
  }
  if (cur.length) chunks.push(cur);
  return chunks;
}

function chunkLabel(items: Item[], path: string): FinderChunk {
  const nodes = new Set<string>();
  const rowBands = new Set<string>();
  let allNodes = false;
  let allRowBands = false;
  for (const { product: p } of items) {
    if (p.node === undefined) allNodes = true;
    else nodes.add(p.node);
    if (p.rowBand === undefined) allRowBands = true;
    else rowBands.add(p.rowBand);
  }
  return {
    path,
    products: items.length,
    releases: [...new Set(items.map((x) => x.release.key))],
    spans: mergeSpans(items.map((x) => [x.product.validFrom, x.product.validTo])),
    ...(nodes.size ? { nodes: [...nodes].sort() } : {}),
    ...(rowBands.size ? { rowBands: [...rowBands].sort() } : {}),
    ...(allNodes ? { allNodes: true as const } : {}),
    ...(allRowBands ? { allRowBands: true as const } : {}),
  };
}

/** The manifest and chunk documents of one detector entry of an instrument. */
export function finderEntryDocuments(index: ReleaseIndex, instrument: string, entry: string, filter: string | null, maxProducts = FINDER_CHUNK_PRODUCTS): SiteDocument[] {
  const releases = index.releases.filter((r) => r.instrument === instrument);
  // Ids are scoped by instrument: the release that supersedes one is looked up among its own.
  const supersededBy = new Map<string, string>();
  for (const r of releases) if (r.supersedes !== null && !supersededBy.has(r.supersedes)) supersededBy.set(r.supersedes, r.id);
  const items: Item[] = releases.flatMap((release) => release.products.filter((p) => p.detector === entry).map((product) => ({ release, product })));
  // Array.prototype.sort is stable: equal preference keeps index order, as the lookup does.
  items.sort(preference);
  const runs: Item[][] = [];
  for (const it of items) {
    const last = runs[runs.length - 1];
    if (last && last[0].release.key === it.release.key) last.push(it);
    else runs.push([it]);
  }
  const head = { instrument, detector: entry, ...(filter ? { filter } : {}) };
  const chunks = packRuns(runs, maxProducts);
  const docs: SiteDocument[] = chunks.map((c, k) => {
    const byRelease = new Map<string, FinderRelease>();
    for (const { release: r, product } of c) {
      let fr = byRelease.get(r.key);
      if (!fr) {
        const by = r.status === 'superseded' ? supersededBy.get(r.id) : undefined;
        fr = { id: r.id, key: r.key, status: r.status, date: r.date, ...(by ? { supersededBy: by } : {}), products: [] };
        byRelease.set(r.key, fr);
      }
      fr.products.push(finderProduct(product));
    }
    const doc: FinderChunkDoc = { schema: 'kiln/finder-chunk/1', ...head, chunk: k, releases: [...byRelease.values()] };
    return { path: finderChunkPath(instrument, entry, k), doc };
  });
  const manifest: FinderManifestDoc = {
    schema: 'kiln/finder-manifest/1',
    ...head,
    products: items.length,
    chunkProducts: maxProducts,
    chunks: chunks.map((c, k) => chunkLabel(c, docs[k].path)),
  };
  return [{ path: finderPath(instrument, entry), doc: manifest }, ...docs];
}

/** The finder's documents: per instrument and detector (and configuration), a manifest and its chunks. */
export function finderDocuments(index: ReleaseIndex, maxProducts = FINDER_CHUNK_PRODUCTS): SiteDocument[] {
  const out: SiteDocument[] = [];
  for (const inst of index.instruments)
    for (const det of inst.detectors)
      // One set per detector and configuration: a file of another filter is never in it.
      for (const conf of inst.configurations ?? [null]) out.push(...finderEntryDocuments(index, inst.id, conf ? `${det.id}.${conf.id}` : det.id, conf?.id ?? null, maxProducts));
  return out;
}
