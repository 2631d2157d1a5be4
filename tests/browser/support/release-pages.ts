/**
 * Where a built release shows what: a release with few detectors and checks is drawn on its own
 * page; one with more has a page per detector (src/lib/release-layout.ts decides, from the
 * summary the pages read).
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { ReleaseIndex, ReleaseSummaryDoc } from '../../../generators/site-data/types.ts';
import { detectorsInline } from '../../../src/lib/release-layout.ts';
import { DIST } from './server.ts';

export const summaryOf = (id: string): ReleaseSummaryDoc => JSON.parse(readFileSync(join(DIST, 'data', 'releases', id, 'summary.json'), 'utf8')) as ReleaseSummaryDoc;

export const isInline = (id: string): boolean => detectorsInline(summaryOf(id));

/** The pages holding a release's downloads, plots and profile pickers. */
export const contentPages = (id: string): string[] =>
  isInline(id) ? [`/releases/${id}/`] : summaryOf(id).detectors.map((d) => `/releases/${id}/detectors/${d.id}/`);

/** The newest release drawn on its own page. */
export function newestInline(index: ReleaseIndex): string {
  const id = index.releases.map((r) => r.id).find(isInline);
  if (!id) throw new Error('no release of the built site is drawn on its own page');
  return id;
}
