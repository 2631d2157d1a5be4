/** Which product of a release applies on a date. */
import type { ProductSummary } from '../site-data/types.ts';

/**
 * The ARF of `detector` valid on `date` (validFrom ≤ date < validTo, open end = null), else the
 * latest one: what an older release offers for a newer release's epoch.
 */
export function arfValidOn(products: readonly ProductSummary[], detector: string, date: string): ProductSummary | undefined {
  const arfs = products.filter((p) => p.kind === 'arf' && p.detector === detector).sort((a, b) => a.validFrom.localeCompare(b.validFrom));
  return arfs.find((p) => p.validFrom <= date && (p.validTo === null || date < p.validTo)) ?? arfs[arfs.length - 1];
}
