/**
 * Re-examination of an archived release: at each build, today's checks run on the archive's
 * verified bytes (gunzipped in memory, never written back), with the release's frozen inputs
 * (the build has checked they are the ones it was published from) and its own check settings.
 * The result is a document of its own beside the release's site data; the archived validation
 * report stays what was published.
 */
import { gunzipSync } from 'node:zlib';
import type { ResolvedRelease } from '../content/types.ts';
import { reexaminedCounts, reexaminedFindings } from '../checks/index.ts';
import type { Check, DetectorSupplementDoc, ReexaminationDoc } from '../site-data/types.ts';
import type { VerifiedArchive } from './archive.ts';
import { jobsOf } from './inputs.ts';
import { recheckDetector, type CheckedFile, type LineRefits } from './validate.ts';
import { archivedSupplement } from './site-supplement.ts';

/** Largest product the re-examination gunzips (as `kiln check`: far above any real response). */
const MAX_PRODUCT_BYTES = 2 * 1024 ** 3;

/**
 * With `supplements`, also the curves the archive's site data predate, per detector
 * (site-supplement.ts), from the same matrix read and closure refits.
 */
export function reexamineArchive(r: ResolvedRelease, archive: VerifiedArchive, generator: string, supplements?: Map<string, DetectorSupplementDoc>): ReexaminationDoc {
  const now: Check[] = [];
  const skipped: ReexaminationDoc['skipped'] = [];
  for (const job of jobsOf(r)) {
    const det = job.detector.id;
    const files: CheckedFile[] = archive.site.products
      .filter((p) => p.detector === det)
      .map((p) => {
        const gz = archive.bytes.get(p.path);
        if (!gz) throw new Error(`archive of ${r.release.id}: ${p.path} listed but not read`);
        return { id: p.id, name: p.path.split('/').pop()!, kind: p.kind, fits: new Uint8Array(gunzipSync(gz, { maxOutputLength: MAX_PRODUCT_BYTES })) };
      });
    const refits: LineRefits = new Map();
    const re = recheckDetector(job, files, refits);
    const published = archive.site.detectors.find((d) => d.id === det);
    if (re && supplements && published) supplements.set(det, archivedSupplement(r.release.id, job, re.rmf, published, refits, generator));
    if (re) now.push(...re.checks);
    else skipped.push({ detector: det, reason: 'no matrix (RMF) among its archived products' });
  }
  const findings = reexaminedFindings(archive.report.checks, now);
  return { schema: 'kiln/reexamination/1', release: r.release.id, generator, counts: reexaminedCounts(findings, now.length), findings, skipped };
}
