/**
 * Which products the impact of a change compares, per detector: the newer release's matrix and its
 * newest effective area (what an observer downloads today), and the older release's matrix with
 * the effective area it offers for that epoch's start. Pure and browser-safe: the build and the
 * compare page's worker pick the same files, so an impact computed in a browser equals the
 * build's for the same pair.
 */
import type { ProductSummary } from '../site-data/types.ts';

export interface ImpactPair {
  detector: string;
  newer: { rmf: ProductSummary; arf: ProductSummary };
  /** Null when the older release has no matrix or area for this detector. */
  older: { rmf: ProductSummary; arf: ProductSummary } | null;
}

/** The newest ARF of a detector (its last epoch). */
export function latestArf(products: readonly ProductSummary[], detector: string): ProductSummary | undefined {
  return products.filter((p) => p.kind === 'arf' && p.detector === detector).sort((a, b) => a.validFrom.localeCompare(b.validFrom)).pop();
}

/**
 * The ARF of `detector` valid on `date` (validFrom ≤ date < validTo, open end = null), else the
 * latest one: what an older release offers for a newer release's epoch.
 */
export function arfValidOn(products: readonly ProductSummary[], detector: string, date: string): ProductSummary | undefined {
  const arfs = products.filter((p) => p.kind === 'arf' && p.detector === detector).sort((a, b) => a.validFrom.localeCompare(b.validFrom));
  return arfs.find((p) => p.validFrom <= date && (p.validTo === null || date < p.validTo)) ?? arfs[arfs.length - 1];
}

/** Detectors with a matrix, in product order. */
export function matrixDetectors(products: readonly ProductSummary[]): string[] {
  return [...new Set(products.filter((p) => p.kind === 'rmf').map((p) => p.detector))];
}

/** The pairs for every detector of the newer release that has a matrix and an area (optionally only `detectors`). */
export function impactPairs(newer: readonly ProductSummary[], older: readonly ProductSummary[] | null, detectors?: readonly string[]): ImpactPair[] {
  const out: ImpactPair[] = [];
  for (const det of matrixDetectors(newer)) {
    if (detectors && !detectors.includes(det)) continue;
    const rmf = newer.find((p) => p.kind === 'rmf' && p.detector === det)!;
    const arf = latestArf(newer, det);
    if (!arf) continue;
    const oRmf = older?.find((p) => p.kind === 'rmf' && p.detector === det);
    const oArf = older ? arfValidOn(older, det, arf.validFrom) : undefined;
    out.push({ detector: det, newer: { rmf, arf }, older: oRmf && oArf ? { rmf: oRmf, arf: oArf } : null });
  }
  return out;
}
