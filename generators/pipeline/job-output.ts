/**
 * What one detector job leaves behind once its products are compressed: the gzipped product
 * bytes with their SHA-256, and the summaries the release needs (checks, site data, parameters,
 * fits). This is the unit the cache stores, a shard hands over and the build consumes, so a job
 * read back gives the same output bytes as a job just run.
 */
import { qualifiedReleaseName } from '../content/release-key.ts';
import { gzipSync } from 'node:zlib';
import type { Check, DetectorSite, ParameterRow, ProductKind } from '../site-data/types.ts';
import { canonicalJson, sha256Hex } from './hash.ts';
import type { DetectorJob } from './job.ts';
import { runDetectorJob, type DetectorJobResult } from './run-job.ts';
import type { RedistributionResult } from '../response/index.ts';

/** gzip level of product files: the smallest files; speed matters little next to the model (zlib's 9). */
const GZIP_LEVEL = 9;
/** Bump when the meaning of a job's fingerprinted view changes. */
export const JOB_SCHEMA = 'kiln/job/1';

export function gzipProduct(fits: Uint8Array): Uint8Array {
  // Node's gzip writes MTIME 0 and a fixed OS byte: identical input gives identical bytes.
  return new Uint8Array(gzipSync(fits, { level: GZIP_LEVEL }));
}

export interface JobFile {
  id: string;
  kind: ProductKind;
  detector: string;
  epoch: string;
  /** Readout node and row band of a per-region product (absent: the whole detector). */
  node?: string;
  rowBand?: string;
  /** File name in the release's files/ directory (gzipped). */
  name: string;
  validFrom: string;
  validTo: string | null;
  /** Energy range (keV) and, for matrices, channel range the model covers completely. */
  validEnergyKeV?: [number, number];
  validChannels?: [number, number];
  bytes: number;
  sha256: string;
}

export interface JobOutputMeta {
  schema: 'kiln/job-output/1';
  /** "<release>/<detector>". */
  job: string;
  fingerprint: string;
  generator: string;
  files: JobFile[];
  checks: Check[];
  site: DetectorSite;
  parameters: ParameterRow[];
  fits: DetectorJobResult['fits'];
  nnz: number;
}

export interface JobOutput {
  meta: JobOutputMeta;
  /** Gzipped product bytes, aligned with meta.files. */
  gz: Uint8Array[];
}

/** `<instrument>~<release id>/<detector>`: release ids are scoped by instrument. */
export const jobIdOf = (job: DetectorJob): string => `${qualifiedReleaseName(job.instrument.id, job.release.id)}/${job.detector.id}`;

/**
 * A job's input fingerprint: everything it is made from (release fields, instrument grids and
 * mirror table, the resolved detector model with its line fits and epochs) and the generator's
 * version. File paths are included: error and check messages may name them. A job read from a
 * model document carries the document's SHA-256 (written into every product's HISTORY), so a
 * change to any detector of that release changes every job of the release; the document itself
 * is left out, its SHA-256 stands for it.
 */
export function jobFingerprint(job: DetectorJob, generator: string): string {
  const { rebuildFrom: _doc, ...rest } = job;
  return sha256Hex(canonicalJson({ schema: JOB_SCHEMA, generator, job: rest }));
}

export function produceJobOutput(job: DetectorJob, fingerprint: string, generator: string, prebuilt?: ReadonlyMap<string, RedistributionResult>): JobOutput {
  const r = runDetectorJob(job, prebuilt);
  const gz = r.files.map((f) => gzipProduct(f.fits));
  const files: JobFile[] = r.files.map((f, i) => ({
    id: f.id,
    kind: f.kind,
    detector: f.detector,
    ...(f.node !== undefined ? { node: f.node } : {}),
    ...(f.rowBand !== undefined ? { rowBand: f.rowBand } : {}),
    epoch: f.epoch,
    name: f.name,
    validFrom: f.validFrom,
    validTo: f.validTo,
    ...(f.validEnergyKeV ? { validEnergyKeV: f.validEnergyKeV } : {}),
    ...(f.validChannels ? { validChannels: f.validChannels } : {}),
    bytes: gz[i].length,
    sha256: sha256Hex(gz[i]),
  }));
  return {
    meta: { schema: 'kiln/job-output/1', job: jobIdOf(job), fingerprint, generator, files, checks: r.checks, site: r.site, parameters: r.parameters, fits: r.fits, nnz: r.nnz },
    gz,
  };
}
