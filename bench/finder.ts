/**
 * The finder and the JSON index at 10,000 products (issue budget: "usable"): a synthetic index in
 * the build's own format (src/lib/finder.ts reads it as the page does), 4 detectors × 8 nodes ×
 * 4 row bands, 12 epochs per release, RMF per region and ARF per epoch, releases one after the
 * other. Reports the size of index.json and of the largest per-detector finder document, and the
 * median and 99th-percentile time of one lookup (detector, node, row band, date) over seeded
 * queries. Invented ids only.
 */
import { finderDocuments } from '../generators/site-data/split.ts';
import type { ProductSummary, ReleaseIndex, ReleaseSummary } from '../generators/site-data/types.ts';
import { findFiles } from '../src/lib/finder.ts';
import { round } from './measure.ts';

const DETECTORS = ['d0', 'd1', 'd2', 'd3'];
const NODES = ['a', 'b', 'c', 'd', 'e', 'f', 'g', 'h'];
const BANDS = ['r1', 'r2', 'r3', 'r4'];
const EPOCHS = 12;
const TARGET_PRODUCTS = 10_000;
const QUERIES = 2000;
const DAY_MS = 86_400_000;

const iso = (ms: number) => new Date(ms).toISOString().slice(0, 10);

function syntheticIndex(): ReleaseIndex {
  const perRelease = DETECTORS.length * (NODES.length * BANDS.length + EPOCHS);
  const n = Math.ceil(TARGET_PRODUCTS / perRelease);
  const t0 = Date.UTC(2026, 0, 1);
  const releases: ReleaseSummary[] = [];
  for (let k = 0; k < n; k++) {
    const from = t0 + k * 90 * DAY_MS;
    const to = from + 720 * DAY_MS;
    const id = `${1 + Math.floor(k / 10)}.${k % 10}.0`;
    const products: ProductSummary[] = [];
    for (const d of DETECTORS) {
      for (const node of NODES)
        for (const rowBand of BANDS)
          products.push({ id: `${d}-${node}-${rowBand}-rmf`, kind: 'rmf', detector: d, node, rowBand, epoch: 'all', path: `files/bench_${d}-${node}-${rowBand}_${id}.rmf.gz`, bytes: 450_000, sha256: '0'.repeat(64), validFrom: iso(from), validTo: iso(to), validEnergyKeV: [0.2, 12], validChannels: [14, 799] } as ProductSummary);
      for (let e = 0; e < EPOCHS; e++)
        products.push({ id: `${d}-e${e}-arf`, kind: 'arf', detector: d, epoch: `e${e}`, path: `files/bench_${d}_e${e}_${id}.arf.gz`, bytes: 9000, sha256: '0'.repeat(64), validFrom: iso(from + e * 60 * DAY_MS), validTo: e === EPOCHS - 1 ? iso(to) : iso(from + (e + 1) * 60 * DAY_MS), validEnergyKeV: [0.2, 12] } as ProductSummary);
    }
    releases.unshift({ id, instrument: 'bench-cam', title: `bench release ${id}`, date: iso(from), status: k === n - 1 ? 'published' : 'superseded', validFrom: iso(from), validTo: iso(to), supersedes: k ? releases[0].id : null, checks: { pass: 1, fail: 0, warn: 0, review: 0, accepted: 0 }, products } as unknown as ReleaseSummary);
  }
  return {
    schema: 'kiln/release-index/1',
    instruments: [{ id: 'bench-cam', telescope: 'BENCH', instrument: 'CAM', title: 'bench', description: 'synthetic', channels: { count: 1024 }, detectors: DETECTORS.map((id) => ({ id, name: id, kind: 'CCD' })) }] as unknown as ReleaseIndex['instruments'],
    releases,
  };
}

export function finderCase(): Record<string, unknown> {
  const index = syntheticIndex();
  const products = index.releases.reduce((s, r) => s + r.products.length, 0);
  const indexBytes = Buffer.byteLength(JSON.stringify(index));
  const docs = finderDocuments(index);
  const finderBytes = Math.max(...docs.map((d) => Buffer.byteLength(JSON.stringify(d.doc))));
  const doc = docs[0].doc as Pick<ReleaseIndex, 'releases'>;
  let seed = 1;
  const rnd = () => ((seed = (seed * 48271) % 2147483647) / 2147483647);
  const first = Date.UTC(2026, 0, 1);
  const span = index.releases.length * 90 * DAY_MS;
  const times: number[] = [];
  let hits = 0;
  for (let q = 0; q < QUERIES; q++) {
    const date = iso(first + rnd() * span);
    const at = { node: NODES[Math.floor(rnd() * NODES.length)], rowBand: BANDS[Math.floor(rnd() * BANDS.length)] };
    const t = performance.now();
    hits += findFiles(doc, DETECTORS[0], date, at).length;
    times.push(performance.now() - t);
  }
  times.sort((a, b) => a - b);
  return {
    case: 'finder-10k',
    products,
    releases: index.releases.length,
    indexKB: round(indexBytes / 1024, 1),
    largestFinderDocKB: round(finderBytes / 1024, 1),
    lookupMedianMs: round(times[Math.floor(QUERIES / 2)], 3),
    lookupP99Ms: round(times[Math.floor(QUERIES * 0.99)], 3),
    meanHitsPerLookup: round(hits / QUERIES, 2),
    note: `synthetic index: ${DETECTORS.length} detectors × ${NODES.length} nodes × ${BANDS.length} row bands, ${EPOCHS} epochs per release; lookup = findFiles on one detector's finder document (what the finder page fetches)`,
  };
}
