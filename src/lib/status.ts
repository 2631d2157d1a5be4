/** Release status order and wording shared by the pages. */
import type { ReleaseStatus, ReleaseSummary } from '../../generators/site-data/types.ts';

/** Preference when several releases cover the same date: published first (the finder's documents are cut in this order). */
export { STATUS_PREFERENCE, statusRank } from '../../generators/site-data/finder.ts';

export const STATUS_HINT: Record<ReleaseStatus, string> = {
  published: 'recommended for analysis',
  candidate: 'under review, not yet recommended',
  superseded: 'replaced by a newer release',
  withdrawn: 'withdrawn: do not use',
  draft: 'draft, not for use',
};

/** Current release of a detector: newest published, else newest candidate (index is newest first). */
export function currentRelease(releases: ReleaseSummary[], detector: string): ReleaseSummary | null {
  const has = (r: ReleaseSummary) => r.products.some((p) => p.detector === detector);
  return releases.find((r) => r.status === 'published' && has(r)) ?? releases.find((r) => r.status === 'candidate' && has(r)) ?? null;
}

export const validity = (from: string, to: string | null): string => `${from} → ${to ?? 'open'}`;
