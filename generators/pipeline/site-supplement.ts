/**
 * The curves an archived release's published site data predate (tail and shelf fractions, line
 * efficiency, the line fits' errors and closure refits), computed from its verified archived
 * matrix and its frozen inputs exactly as for a built release (site-detector.ts). Written beside
 * the served documents (detectors/<id>/supplement.json); the archive is never changed.
 */
import type { DetectorSite, DetectorSupplementDoc } from '../site-data/types.ts';
import type { RmfData } from '../response/types.ts';
import type { DetectorJob } from './job.ts';
import { detectorParamsAt, efficiencyCurvesFrom, lineFitExtras, round } from './site-detector.ts';
import type { LineRefits } from './validate.ts';

export function archivedSupplement(releaseId: string, job: DetectorJob, rmf: RmfData, published: DetectorSite, refits: LineRefits, generator: string): DetectorSupplementDoc {
  const { paramsAt, tailOf } = detectorParamsAt(job);
  const e = published.resolution.energyKeV;
  const first = published.epochs[0];
  const eff = first ? efficiencyCurvesFrom(first.id, first.energyKeV, first.detectorQE, rmf) : null;
  const extras = lineFitExtras(job, rmf, refits);
  const lines = job.detector.lineFits;
  // Published and frozen line fits are the same lines; if not, the supplement carries none.
  const same = lines.length === published.lineFits.length && lines.every((l, i) => l.line === published.lineFits[i].line && l.energyKeV === published.lineFits[i].energyKeV);
  return {
    schema: 'kiln/detector-supplement/1',
    release: releaseId,
    detector: job.detector.id,
    generator,
    resolution: {
      tailFraction: e.map((x) => round(tailOf(paramsAt(x)))),
      shelfFraction: e.map((x) => round(paramsAt(x).shelfFraction)),
      tailSource: job.detector.redistribution.tail.source,
    },
    ...(eff ? { efficiency: eff.curve } : {}),
    lineFits: same ? lines.map((l) => extras.get(l) ?? {}) : [],
  };
}
