/**
 * Cache of a release's spectral section (`<cache>/spectral/<key>.json`): the predictions and the
 * impact fits take seconds per source, so a rebuild whose responses and sources did not change
 * reuses them. The key covers everything releaseSpectral reads: the instrument's spectral
 * settings and reference sources, the SHA-256 of every product of both releases (the bytes the
 * fits fold through) and the generator's version.
 */
import type { Instrument } from '../content/types.ts';
import type { ReleaseSpectral } from '../site-data/types.ts';
import { readDocEntry, writeDocEntry, type DocRead } from './doc-cache.ts';
import { canonicalJson, sha256Hex } from './hash.ts';
import { referenceSources, type ReleaseProducts } from './impact.ts';

const ENTRY_SCHEMA = 'kiln/spectral-entry/1';
export const SPECTRAL_DIR = 'spectral';

const productsView = (r: ReleaseProducts | null) => (r === null ? null : { id: r.id, products: r.products.map((p) => ({ id: p.id, kind: p.kind, detector: p.detector, path: p.path, epoch: p.epoch, validFrom: p.validFrom, sha256: p.sha256 })) });

export function spectralKey(ins: Instrument, newer: ReleaseProducts, older: ReleaseProducts | null, generator: string): string {
  return sha256Hex(canonicalJson({ schema: ENTRY_SCHEMA, generator, spectral: ins.spectral ?? null, sources: referenceSources(ins), newer: productsView(newer), older: productsView(older) }));
}

export const readSpectralEntry = (root: string, key: string): DocRead<ReleaseSpectral> => readDocEntry<ReleaseSpectral>({ root, schema: ENTRY_SCHEMA }, key);
export const writeSpectralEntry = (root: string, key: string, doc: ReleaseSpectral): void => writeDocEntry({ root, schema: ENTRY_SCHEMA }, key, doc);
export { pruneDocEntries as pruneSpectralEntries } from './doc-cache.ts';
