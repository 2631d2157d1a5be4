/** Files valid for an observation date: validFrom ≤ date < validTo (validTo null = open). */
import type { ProductSummary, ReleaseIndex, ReleaseSummary } from '../../generators/site-data/types.ts';
import { statusRank } from './status.ts';

export interface FinderHit {
  release: ReleaseSummary;
  product: ProductSummary;
  /** Non-null for superseded or withdrawn releases. */
  warning: string | null;
}

/** Order of the kinds within a release: the matrix (or combined response) first, then the ARF. */
const KIND_ORDER = ['rsp', 'rmf', 'arf'];

/** ISO dates (YYYY-MM-DD) compare correctly as strings; longer timestamps are cut to the date. */
const day = (s: string) => s.slice(0, 10);

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

/** The readout nodes and row bands some product of a detector is made for (sorted), from the index or a finder document. */
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

/** `index`: the release index, or a detector's finder document (same releases, fewer products). */
export function findFiles(index: Pick<ReleaseIndex, 'releases'>, detector: string, dateIso: string, at: FinderPosition = {}): FinderHit[] {
  const hits: FinderHit[] = [];
  for (const r of index.releases) {
    if (r.status === 'draft') continue;
    for (const p of r.products)
      if (p.detector === detector && coversDate(p, dateIso) && coversPosition(p, at))
        hits.push({
          release: r,
          product: p,
          warning:
            r.status === 'withdrawn'
              ? `Release ${r.id} was withdrawn: do not use these files.`
              : r.status === 'superseded'
                ? `Release ${r.id} is superseded${index.releases.find((x) => x.supersedes === r.id) ? ` by ${index.releases.find((x) => x.supersedes === r.id)!.id}` : ''}.`
                : null,
        });
  }
  // Status preference, then newest release date first, then the matrix before the area file.
  return hits.sort(
    (a, b) => statusRank(a.release.status) - statusRank(b.release.status) || b.release.date.localeCompare(a.release.date) || KIND_ORDER.indexOf(a.product.kind) - KIND_ORDER.indexOf(b.product.kind),
  );
}
