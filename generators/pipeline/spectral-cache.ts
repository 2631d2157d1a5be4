/**
 * Cache of a release's spectral section (`<cache>/spectral/<key>.json`): the predictions and the
 * impact fits take seconds per source, so a rebuild whose responses and sources did not change
 * reuses them. The key covers everything releaseSpectral reads: the instrument's spectral
 * settings and reference sources, the SHA-256 of every product of both releases (the bytes the
 * fits fold through) and the generator's version. An entry is trusted only when its key and the
 * SHA-256 of its document match; anything else is reported and recomputed.
 */
import { existsSync, mkdirSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import type { Instrument } from '../content/types.ts';
import { writeFileAtomic } from '../node/files.ts';
import type { ReleaseSpectral } from '../site-data/types.ts';
import { canonicalJson, sha256Hex } from './hash.ts';
import { referenceSources, type ReleaseProducts } from './impact.ts';

const ENTRY_SCHEMA = 'kiln/spectral-entry/1';
export const SPECTRAL_DIR = 'spectral';

const productsView = (r: ReleaseProducts | null) => (r === null ? null : { id: r.id, products: r.products.map((p) => ({ id: p.id, kind: p.kind, detector: p.detector, path: p.path, epoch: p.epoch, validFrom: p.validFrom, sha256: p.sha256 })) });

export function spectralKey(ins: Instrument, newer: ReleaseProducts, older: ReleaseProducts | null, generator: string): string {
  return sha256Hex(canonicalJson({ schema: ENTRY_SCHEMA, generator, spectral: ins.spectral ?? null, sources: referenceSources(ins), newer: productsView(newer), older: productsView(older) }));
}

export type SpectralRead = { ok: true; doc: ReleaseSpectral } | { ok: false; missing: boolean; reason: string };

export function readSpectralEntry(root: string, key: string): SpectralRead {
  const file = join(root, `${key}.json`);
  if (!existsSync(file)) return { ok: false, missing: true, reason: 'no entry' };
  try {
    const e = JSON.parse(readFileSync(file, 'utf8')) as { schema?: string; key?: string; docSha256?: string; doc?: string };
    if (e.schema !== ENTRY_SCHEMA) return { ok: false, missing: false, reason: `schema ${JSON.stringify(e.schema)}, expected ${ENTRY_SCHEMA}` };
    if (e.key !== key || typeof e.doc !== 'string') return { ok: false, missing: false, reason: 'entry is for another key' };
    if (sha256Hex(e.doc) !== e.docSha256) return { ok: false, missing: false, reason: 'document does not match its SHA-256' };
    return { ok: true, doc: JSON.parse(e.doc) as ReleaseSpectral };
  } catch (err) {
    return { ok: false, missing: false, reason: `unreadable (${(err as Error).message})` };
  }
}

export function writeSpectralEntry(root: string, key: string, doc: ReleaseSpectral): void {
  mkdirSync(root, { recursive: true });
  const text = JSON.stringify(doc);
  writeFileAtomic(join(root, `${key}.json`), JSON.stringify({ schema: ENTRY_SCHEMA, key, docSha256: sha256Hex(text), doc: text }) + '\n');
}

/** Removes entries this build did not use (like the job entries). */
export function pruneSpectralEntries(root: string, keep: Set<string>): void {
  if (!existsSync(root)) return;
  for (const n of readdirSync(root)) if (!keep.has(n.replace(/\.json$/, ''))) rmSync(join(root, n), { recursive: true, force: true });
}
