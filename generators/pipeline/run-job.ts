/** One detector job end to end: products, their checks and their site data. Pure. */
import type { Check, DetectorSite, ParameterRow } from '../site-data/types.ts';
import type { FitResult } from '../fit/index.ts';
import type { BuiltFile, DetectorJob } from './job.ts';
import { buildDetectorProducts } from './product.ts';
import { detectorSite } from './site-detector.ts';
import { validateDetector, type LineRefits } from './validate.ts';
import { rebuildChecks } from '../model/rebuild.ts';
import type { RedistributionResult } from '../response/index.ts';

export interface DetectorJobResult {
  releaseId: string;
  detectorId: string;
  files: BuiltFile[];
  checks: Check[];
  site: DetectorSite;
  parameters: ParameterRow[];
  fits: { fwhm: FitResult | null; centroid: FitResult | null };
  nnz: number;
}

/** `prebuilt`: the job's matrices already made (pipeline/product.ts jobMatrixInputs), by region label. */
export function runDetectorJob(job: DetectorJob, prebuilt?: ReadonlyMap<string, RedistributionResult>): DetectorJobResult {
  const built = buildDetectorProducts(job, prebuilt);
  const refits: LineRefits = new Map();
  const checks = validateDetector(job, built, refits);
  if (job.rebuildFrom && job.modelSha256) checks.push(...rebuildChecks(job.rebuildFrom, job.modelSha256, job.detector.id, built.files));
  const { site, parameters, fits } = detectorSite(job, built, refits);
  return {
    releaseId: job.release.id,
    detectorId: job.detector.id,
    files: built.files,
    checks,
    site,
    parameters,
    fits,
    nnz: built.redistribution.nnz,
  };
}
