/**
 * One side of a comparison from the split documents: the release's summary and, for the detectors
 * shown, their model, effective areas and checks. The compare body renders this as it would a
 * whole release, so the page never needs more than the shown detectors' documents.
 */
import { detectorForCompare } from '../../../generators/site-data/split.ts';
import type { DetectorAreaDoc, DetectorChecksDoc, DetectorModelDoc, ReleaseSite, ReleaseSummaryDoc, ValidationReport } from '../../../generators/site-data/types.ts';

export interface CompareDetectorDocs {
  model: DetectorModelDoc;
  area: DetectorAreaDoc;
  checks: DetectorChecksDoc;
}

export function compareSide(summary: ReleaseSummaryDoc, dets: CompareDetectorDocs[]): { site: ReleaseSite; report: ValidationReport } {
  const site: ReleaseSite = {
    schema: 'kiln/release-site/1',
    id: summary.id,
    instrument: summary.instrument,
    title: summary.title,
    date: summary.date,
    status: summary.status,
    validFrom: summary.validFrom,
    validTo: summary.validTo,
    supersedes: summary.supersedes,
    notesMarkdown: summary.notesMarkdown,
    parameters: [...summary.parameters, ...dets.flatMap((d) => d.model.parameters)],
    detectors: dets.map((d) => detectorForCompare(d.model, d.area)),
    products: dets.flatMap((d) => d.model.products),
  };
  return { site, report: { schema: 'kiln/validation/1', release: summary.id, checks: [...summary.checks, ...dets.flatMap((d) => d.checks.checks)] } };
}

/**
 * Detectors shown for a pair: all of them when there are few (the page stays within its budget),
 * else the one chosen (default: B's first), in B's order then A's.
 */
export function shownDetectors(a: ReleaseSummaryDoc, b: ReleaseSummaryDoc, chosen: string | null, inlineMax: number): string[] {
  const all = [...new Set([...b.detectors.map((d) => d.id), ...a.detectors.map((d) => d.id)])];
  if (all.length <= inlineMax) return all;
  return [chosen && all.includes(chosen) ? chosen : all[0]];
}
