/**
 * The finder and the JSON index at 10,000 products (issue budget: "usable"): a synthetic index in
 * the build's own format, 4 detectors × 8 nodes × 4 row bands, 12 epochs per release, RMF per
 * region and ARF per epoch. The finder's documents are made as the build makes them
 * (generators/site-data/finder.ts) and looked up as the page does (src/lib/finder.ts: manifest,
 * then the chunks that can cover the date and position). Reports the size of index.json, of the
 * largest manifest and chunk, the bytes one lookup fetches (manifest + chunks of its first step),
 * and the median and 99th-percentile time of a lookup (chunk choice and search, documents already
 * parsed) over seeded queries; each query's answer is checked against findFiles on the whole
 * index. Two validity patterns: releases one after the other (each valid 720 days, one every 90),
 * and every release valid from the mission's start, open-ended (as the demo's are), where every
 * release covers every date; each at the base number of releases and at twice as many.
 * Invented ids only.
 */
import { finderDocuments } from '../generators/site-data/finder.ts';
import type { FinderChunk, FinderManifestDoc, ProductSummary, ReleaseIndex, ReleaseSummary } from '../generators/site-data/types.ts';
import { findFiles, lookupStep, startLookup, type FinderPosition } from '../src/lib/finder.ts';
import { round } from './measure.ts';

const DETECTORS = ['d0', 'd1', 'd2', 'd3'];
const NODES = ['a', 'b', 'c', 'd', 'e', 'f', 'g', 'h'];
const BANDS = ['r1', 'r2', 'r3', 'r4'];
const EPOCHS = 12;
const TARGET_PRODUCTS = 10_000;
const QUERIES = 2000;
const CHECK_EVERY = 5;
const DAY_MS = 86_400_000;
const RELEASE_EVERY_DAYS = 90;
const RELEASE_VALID_DAYS = 720;
const EPOCH_DAYS = 60;

const iso = (ms: number) => new Date(ms).toISOString().slice(0, 10);

/** Releases so that the index holds at least TARGET_PRODUCTS files (57 releases, 10,032 files). */
export const BASE_RELEASES = Math.ceil(TARGET_PRODUCTS / (DETECTORS.length * (NODES.length * BANDS.length + EPOCHS)));

export type ValidityPattern = 'sequential' | 'open';

/** `sequential`: each release valid 720 days from its date; `open`: every release valid from the first date on, open-ended (the last epoch open). */
export function syntheticIndex(releases = BASE_RELEASES, pattern: ValidityPattern = 'sequential'): ReleaseIndex {
  const t0 = Date.UTC(2026, 0, 1);
  const out: ReleaseSummary[] = [];
  for (let k = 0; k < releases; k++) {
    const date = t0 + k * RELEASE_EVERY_DAYS * DAY_MS;
    const from = pattern === 'open' ? t0 : date;
    const to = pattern === 'open' ? null : iso(from + RELEASE_VALID_DAYS * DAY_MS);
    const id = `${1 + Math.floor(k / 10)}.${k % 10}.0`;
    const products: ProductSummary[] = [];
    for (const d of DETECTORS) {
      for (const node of NODES)
        for (const rowBand of BANDS)
          products.push({ id: `${d}-${node}-${rowBand}-rmf`, kind: 'rmf', detector: d, node, rowBand, epoch: 'all', path: `files/bench_${d}-${node}-${rowBand}_${id}.rmf.gz`, bytes: 450_000, sha256: '0'.repeat(64), validFrom: iso(from), validTo: to, validEnergyKeV: [0.2, 12], validChannels: [14, 799] });
      for (let e = 0; e < EPOCHS; e++)
        products.push({ id: `${d}-e${e}-arf`, kind: 'arf', detector: d, epoch: `e${e}`, path: `files/bench_${d}_e${e}_${id}.arf.gz`, bytes: 9000, sha256: '0'.repeat(64), validFrom: iso(from + e * EPOCH_DAYS * DAY_MS), validTo: e === EPOCHS - 1 ? to : iso(from + (e + 1) * EPOCH_DAYS * DAY_MS), validEnergyKeV: [0.2, 12] });
    }
    const supersedes = k ? out[0].id : null;
    out.unshift({ id, instrument: 'bench-cam', key: id, supersedesKey: supersedes, title: `bench release ${id}`, date: iso(date), status: k === releases - 1 ? 'published' : 'superseded', validFrom: iso(from), validTo: to, supersedes, checks: { pass: 1, fail: 0, warn: 0, review: 0, accepted: 0 }, products });
  }
  return {
    schema: 'kiln/release-index/1',
    instruments: [{ id: 'bench-cam', telescope: 'BENCH', instrument: 'CAM', title: 'bench', description: 'synthetic', channels: 1024, detectors: DETECTORS.map((id) => ({ id, name: id, kind: 'CCD', description: '' })) }],
    releases: out,
  };
}

const bytesOf = (doc: unknown) => Buffer.byteLength(JSON.stringify(doc));
const pct = (sorted: number[], q: number) => sorted[Math.min(sorted.length - 1, Math.floor(sorted.length * q))];

/** One scale and pattern: document sizes, and what QUERIES lookups fetch and take. */
export async function finderScale(releases: number, pattern: ValidityPattern): Promise<Record<string, unknown>> {
  const index = syntheticIndex(releases, pattern);
  const products = index.releases.reduce((s, r) => s + r.products.length, 0);
  const docs = finderDocuments(index);
  const byPath = new Map(docs.map((d) => [d.path, d.doc]));
  const size = new Map(docs.map((d) => [d.path, bytesOf(d.doc)]));
  const manifests = docs.filter((d) => (d.doc as { schema: string }).schema === 'kiln/finder-manifest/1');
  const chunkSizes = docs.filter((d) => (d.doc as { schema: string }).schema === 'kiln/finder-chunk/1').map((d) => size.get(d.path)!);
  const manifest = manifests[0].doc as FinderManifestDoc;
  const fetchChunk = async (c: FinderChunk) => byPath.get(c.path);
  let seed = 1;
  const rnd = () => (seed = (seed * 48271) % 2147483647) / 2147483647;
  const first = Date.UTC(2026, 0, 1);
  const span = releases * RELEASE_EVERY_DAYS * DAY_MS;
  const times: number[] = [];
  const fetched: number[] = [];
  const fetchedAny: number[] = [];
  let hits = 0;
  let mismatches = 0;
  const checks: { date: string; at: FinderPosition; lead: string[] }[] = [];
  for (let q = 0; q < QUERIES; q++) {
    const date = iso(first + rnd() * span);
    // Every fourth query asks for "any" position (every region's matrix is listed).
    const any = q % 4 === 3;
    const node = NODES[Math.floor(rnd() * NODES.length)];
    const rowBand = BANDS[Math.floor(rnd() * BANDS.length)];
    const at: FinderPosition = any ? {} : { node, rowBand };
    const t = performance.now();
    const step = await lookupStep(manifest, startLookup(manifest, date, at), fetchChunk, date, at);
    times.push(performance.now() - t);
    hits += step.hits.length;
    (any ? fetchedAny : fetched).push(size.get(manifests[0].path)! + step.loaded.reduce((s, c) => s + size.get(manifest.chunks[c.chunk].path)!, 0));
    checks.push({ date, at, lead: step.hits.map((h) => `${h.release.key}/${h.product.path}`) });
  }
  // Outside the timed loop: the first step's hits lead the whole answer, and loading every
  // candidate chunk gives all of it (every CHECK_EVERY-th query, to keep the case short).
  for (const { date, at, lead } of checks.filter((_, i) => i % CHECK_EVERY === 0)) {
    const whole = findFiles(index, DETECTORS[0], date, at).map((h) => `${h.release.key}/${h.product.path}`);
    let all = startLookup(manifest, date, at);
    do all = await lookupStep(manifest, all, fetchChunk, date, at);
    while (all.loaded.length < all.candidates.length);
    const got = all.hits.map((h) => `${h.release.key}/${h.product.path}`);
    if (got.join('\n') !== whole.join('\n') || lead.some((x, i) => whole[i] !== x)) mismatches++;
  }
  times.sort((a, b) => a - b);
  fetched.sort((a, b) => a - b);
  fetchedAny.sort((a, b) => a - b);
  const kb = (b: number) => round(b / 1024, 1);
  return {
    pattern,
    releases,
    products,
    indexKB: kb(bytesOf(index)),
    chunksPerDetector: manifest.chunks.length,
    manifestKB: kb(Math.max(...manifests.map((d) => size.get(d.path)!))),
    largestChunkKB: kb(Math.max(...chunkSizes)),
    lookupFetchKBMedian: kb(pct(fetched, 0.5)),
    lookupFetchKBMax: kb(fetched[fetched.length - 1]),
    anyPositionFetchKBMax: kb(fetchedAny[fetchedAny.length - 1]),
    lookupMedianMs: round(pct(times, 0.5), 3),
    lookupP99Ms: round(pct(times, 0.99), 3),
    meanHitsPerLookup: round(hits / QUERIES, 2),
    answersChecked: Math.ceil(QUERIES / CHECK_EVERY),
    answersDifferingFromIndexLookup: mismatches,
  };
}

export async function finderCase(): Promise<Record<string, unknown>> {
  const base = await finderScale(BASE_RELEASES, 'sequential');
  const scaling = [];
  for (const [releases, pattern] of [[2 * BASE_RELEASES, 'sequential'], [BASE_RELEASES, 'open'], [2 * BASE_RELEASES, 'open']] as const) scaling.push(await finderScale(releases, pattern));
  const all = [base, ...scaling];
  return {
    case: 'finder-10k',
    ...base,
    largestFinderDocKB: Math.max(...all.map((s) => Math.max(s.manifestKB as number, s.largestChunkKB as number))),
    worstLookupFetchKB: Math.max(...all.map((s) => Math.max(s.lookupFetchKBMax as number, s.anyPositionFetchKBMax as number))),
    worstLookupP99Ms: Math.max(...all.map((s) => s.lookupP99Ms as number)),
    mismatches: all.reduce((n, s) => n + (s.answersDifferingFromIndexLookup as number), 0),
    scaling,
    note: `synthetic index: ${DETECTORS.length} detectors × ${NODES.length} nodes × ${BANDS.length} row bands, ${EPOCHS} epochs per release; lookup = manifest, then the first step of chunks (src/lib/finder.ts lookupStep) for one detector, a quarter of the queries at "any" position; largest/worst over all four scales and patterns`,
  };
}
