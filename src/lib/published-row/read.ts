/**
 * A release's published RMF, read in the browser with the project's own reader: the bytes come
 * from the release's files (same origin), are gunzipped locally and parsed by generators/fits and
 * generators/ogip. Nothing is recomputed; this module is loaded on demand (dynamic import).
 */
import { readFits } from '../../../generators/fits/index.ts';
import { readRmf } from '../../../generators/ogip/index.ts';
import type { RmfData } from '../../../generators/response/types.ts';
import type { ProductSummary } from '../../../generators/site-data/types.ts';
import { maybeGunzip } from '../inspect/gunzip.ts';

/** The detector's redistribution product: kind "rmf" (else a full "rsp"), the all-epoch one first. */
export function rmfProductOf(products: ProductSummary[], detector: string): ProductSummary | undefined {
  const mine = products.filter((p) => p.detector === detector);
  for (const kind of ['rmf', 'rsp']) {
    const ofKind = mine.filter((p) => p.kind === kind);
    const pick = ofKind.find((p) => p.epoch === 'all') ?? ofKind[ofKind.length - 1];
    if (pick) return pick;
  }
  return undefined;
}

/** URL of a product inside its release (the manifest path is release-relative, e.g. "files/x.rmf.gz"). */
export const productUrl = (releaseId: string, p: ProductSummary): string => `/releases/${encodeURIComponent(releaseId)}/${p.path.split('/').map(encodeURIComponent).join('/')}`;

/** Gzip or plain FITS bytes of an RMF → its matrix and channel grid (the reader's errors name the file). */
export async function readPublishedRmf(bytes: Uint8Array, fileName: string): Promise<RmfData> {
  return readRmf(readFits(await maybeGunzip(bytes), { fileName })).data;
}

/** The bytes of a site file; a failed request says which URL and why. */
export async function fetchBytes(url: string, fetchFn: typeof fetch = fetch): Promise<Uint8Array> {
  let r: Response;
  try {
    r = await fetchFn(url);
  } catch (e) {
    throw new Error(`could not fetch ${url} (${(e as Error).message})`);
  }
  if (!r.ok) throw new Error(`could not fetch ${url}: HTTP ${r.status}`);
  return new Uint8Array(await r.arrayBuffer());
}

/** Fetches and reads a product. */
export async function fetchPublishedRmf(url: string, fetchFn: typeof fetch = fetch): Promise<RmfData> {
  const name = decodeURIComponent(url.slice(url.lastIndexOf('/') + 1));
  return readPublishedRmf(await fetchBytes(url, fetchFn), name);
}
