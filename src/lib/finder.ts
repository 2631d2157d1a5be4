/** Files valid for an observation date: validFrom ≤ date < validTo (validTo null = open). */
import { day, preference } from '../../generators/site-data/finder.ts';
import type { FinderChunk, FinderChunkDoc, FinderManifestDoc, FinderProduct, ProductSummary, ReleaseIndex, ReleaseSummary } from '../../generators/site-data/types.ts';

/** What a hit needs of its release: how it ranks and where it lives. */
export type HitRelease = Pick<ReleaseSummary, 'id' | 'key' | 'status' | 'date'>;
/** What a hit needs of its file: a finder entry with its detector entry and configuration. */
export type HitProduct = FinderProduct & Pick<ProductSummary, 'detector' | 'filter'>;

export interface FinderHit<R extends HitRelease = HitRelease, P extends HitProduct = HitProduct> {
  release: R;
  product: P;
  /** Non-null for superseded or withdrawn releases. */
  warning: string | null;
}

export const coversDate = (p: { validFrom: string; validTo: string | null }, dateIso: string): boolean =>
  day(p.validFrom) <= day(dateIso) && (p.validTo === null || day(dateIso) < day(p.validTo));

/**
 * Where on the detector the photons landed: a readout node and a row band, each null for "any".
 * A product made for the whole detector (no node, no row band: every ARF, and the matrices of
 * releases built per detector) applies to every position; a per-region matrix only to its own.
 */
export interface FinderPosition {
  node?: string | null;
  rowBand?: string | null;
}

export const coversPosition = (p: { node?: string; rowBand?: string }, at: FinderPosition): boolean =>
  (p.node === undefined || at.node == null || p.node === at.node) && (p.rowBand === undefined || at.rowBand == null || p.rowBand === at.rowBand);

/** The readout nodes and row bands some product of a detector is made for (sorted), from the index. */
export function regionsOf(index: Pick<ReleaseIndex, 'releases'>, detector: string): { nodes: string[]; rowBands: string[] } {
  const nodes = new Set<string>();
  const rowBands = new Set<string>();
  for (const r of index.releases)
    for (const p of r.products)
      if (p.detector === detector) {
        if (p.node !== undefined) nodes.add(p.node);
        if (p.rowBand !== undefined) rowBands.add(p.rowBand);
      }
  return { nodes: [...nodes].sort(), rowBands: [...rowBands].sort() };
}

const warningOf = (r: HitRelease, supersededBy: string | undefined): string | null =>
  r.status === 'withdrawn' ? `Release ${r.id} was withdrawn: do not use these files.` : r.status === 'superseded' ? `Release ${r.id} is superseded${supersededBy ? ` by ${supersededBy}` : ''}.` : null;

/** Status preference, then newest release date first, then the matrix before the area file; ties keep their order. */
const ranked = <H extends FinderHit<HitRelease, HitProduct>>(hits: H[]): H[] => hits.sort(preference);

/** `index`: the release index (every instrument's releases, newest first). */
export function findFiles(index: Pick<ReleaseIndex, 'releases'>, detector: string, dateIso: string, at: FinderPosition = {}): FinderHit<ReleaseSummary, ProductSummary>[] {
  const hits: FinderHit<ReleaseSummary, ProductSummary>[] = [];
  for (const r of index.releases) {
    if (r.status === 'draft') continue;
    for (const p of r.products)
      if (p.detector === detector && coversDate(p, dateIso) && coversPosition(p, at))
        hits.push({ release: r, product: p, warning: warningOf(r, r.status === 'superseded' ? index.releases.find((x) => x.supersedes === r.id)?.id : undefined) });
  }
  return ranked(hits);
}

/** Whether a chunk can hold a file for the date and the position (from its manifest entry alone). */
export const chunkCovers = (c: FinderChunk, dateIso: string, at: FinderPosition): boolean =>
  c.spans.some(([validFrom, validTo]) => coversDate({ validFrom, validTo }, dateIso)) &&
  (at.node == null || c.allNodes === true || (c.nodes ?? []).includes(at.node)) &&
  (at.rowBand == null || c.allRowBands === true || (c.rowBands ?? []).includes(at.rowBand));

/** The chunks to look in for a date and position, in the manifest's order (the finder's preference). */
export const chunksFor = (m: FinderManifestDoc, dateIso: string, at: FinderPosition = {}): FinderChunk[] => m.chunks.filter((c) => chunkCovers(c, dateIso, at));

/** The hits in some chunks of one manifest, ranked as findFiles ranks them. */
export function findInChunks(chunks: readonly FinderChunkDoc[], dateIso: string, at: FinderPosition = {}): FinderHit[] {
  const hits: FinderHit[] = [];
  for (const c of [...chunks].sort((a, b) => a.chunk - b.chunk))
    for (const r of c.releases) {
      if (r.status === 'draft') continue;
      const release: HitRelease = { id: r.id, key: r.key, status: r.status, date: r.date };
      const warning = warningOf(r, r.supersededBy);
      for (const p of r.products)
        if (coversDate(p, dateIso) && coversPosition(p, at)) hits.push({ release, product: { ...p, detector: c.detector, ...(c.filter ? { filter: c.filter } : {}) }, warning });
    }
  return ranked(hits);
}

/** A fetched document checked to be the chunk the manifest names (a stale or foreign file is an error, not an empty list). */
export function asChunk(doc: unknown, m: FinderManifestDoc, k: number): FinderChunkDoc {
  const c = doc as Partial<FinderChunkDoc> | null;
  const where = `file list ${m.chunks[k]?.path ?? k}`;
  if (!c || c.schema !== 'kiln/finder-chunk/1') throw new Error(`${where}: not a finder chunk (schema ${String(c?.schema)}, expected kiln/finder-chunk/1)`);
  if (c.instrument !== m.instrument || c.detector !== m.detector || c.chunk !== k) throw new Error(`${where}: holds ${c.instrument}/${c.detector} chunk ${c.chunk}, expected ${m.instrument}/${m.detector} chunk ${k} (stale site data?)`);
  if (!Array.isArray(c.releases)) throw new Error(`${where}: field releases missing`);
  return c as FinderChunkDoc;
}

/** The most chunks one lookup step fetches (a step: the first answer, or one "load more"). */
export const FINDER_STEP_CHUNKS = 3;

export interface FinderLookup {
  /** Chunks that can hold a file for the date and position, in order. */
  candidates: FinderChunk[];
  /** The leading candidates fetched so far. */
  loaded: FinderChunkDoc[];
  hits: FinderHit[];
}

/**
 * One step of a lookup: fetch the next candidate chunks in order until some hit is found and the
 * best release's files for this position are all in, at most FINDER_STEP_CHUNKS of them. The hits
 * of the leading chunks are the leading hits of all (the manifest's order is the ranking's), so
 * what a step shows stays right as older releases are loaded after it.
 */
export async function lookupStep(m: FinderManifestDoc, state: FinderLookup, fetchChunk: (c: FinderChunk) => Promise<unknown>, dateIso: string, at: FinderPosition = {}): Promise<FinderLookup> {
  const loaded = [...state.loaded];
  let hits = state.hits;
  for (let n = 0; n < FINDER_STEP_CHUNKS && loaded.length < state.candidates.length; n++) {
    const c = state.candidates[loaded.length];
    loaded.push(asChunk(await fetchChunk(c), m, m.chunks.indexOf(c)));
    hits = findInChunks(loaded, dateIso, at);
    const next = state.candidates[loaded.length];
    if (hits.length && !(next && next.releases.includes(hits[0].release.key))) break;
  }
  return { candidates: state.candidates, loaded, hits };
}

/** A lookup's start: the manifest's candidate chunks, none fetched yet. */
export const startLookup = (m: FinderManifestDoc, dateIso: string, at: FinderPosition = {}): FinderLookup => ({ candidates: chunksFor(m, dateIso, at), loaded: [], hits: [] });
