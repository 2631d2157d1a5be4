/**
 * The contract between the build (generators/pipeline) and the site (src/): every number a page
 * shows comes from these JSON documents, which the build writes and the pages only read.
 * Each array of values is aligned with the energy grid named beside it. Units are in the names.
 *
 * Layout written by `kiln build --out DIR` (default `.kiln/out`):
 *   DIR/index.json                         ReleaseIndex
 *   DIR/releases/<id>/manifest.json        ReleaseManifest
 *   DIR/releases/<id>/validation.json      ValidationReport
 *   DIR/releases/<id>/site.json            ReleaseSite
 *   DIR/releases/<id>/files/<file>         the products (FITS, gzip-compressed: *.rmf.gz, *.arf.gz)
 */

export type ReleaseStatus = 'draft' | 'candidate' | 'published' | 'superseded' | 'withdrawn';
export type ProductKind = 'rmf' | 'arf' | 'rsp';
/** `accepted`: a review item a release lists as signed off (release.yaml `accepted`, or `kiln publish --accept-all`). */
export type CheckStatus = 'pass' | 'fail' | 'warn' | 'review' | 'accepted';

/** Who accepted a review item and why. */
export interface Acceptance {
  reason: string;
  /** The role that accepted it, e.g. "instrument scientist". */
  role: string;
  /** Where the sign-off was given: release.yaml or `kiln publish --accept-all`. */
  source: 'release.yaml' | 'publish --accept-all';
}

export interface DetectorSummary {
  id: string;
  name: string;
  /** e.g. "front-illuminated CCD" */
  kind: string;
  description: string;
}

export interface InstrumentSummary {
  id: string;
  telescope: string;
  instrument: string;
  title: string;
  description: string;
  detectors: DetectorSummary[];
  channels: number;
}

export interface ProductSummary {
  /** Unique within the release, e.g. "fi0-e2-rmf". */
  id: string;
  kind: ProductKind;
  detector: string;
  epoch: string;
  /** Release-relative path, e.g. "files/fi0_e2_v1.2.0.rmf.gz". */
  path: string;
  bytes: number;
  sha256: string;
  /** Observation dates this product applies to: [validFrom, validTo) ISO dates; validTo null = open. */
  validFrom: string;
  validTo: string | null;
}

export interface ReleaseSummary {
  id: string;
  instrument: string;
  title: string;
  date: string;
  status: ReleaseStatus;
  validFrom: string;
  validTo: string | null;
  supersedes: string | null;
  /** `accepted` is absent in indexes of builds before review sign-off existed. */
  checks: { pass: number; fail: number; warn: number; review: number; accepted?: number };
  products: ProductSummary[];
}

export interface ReleaseIndex {
  schema: 'kiln/release-index/1';
  instruments: InstrumentSummary[];
  /** Newest first. */
  releases: ReleaseSummary[];
}

export interface ManifestFile {
  path: string;
  bytes: number;
  sha256: string;
  kind: ProductKind;
  detector: string;
  epoch: string;
  validFrom: string;
  validTo: string | null;
}

export interface ReleaseManifest {
  schema: 'kiln/release-manifest/1';
  release: string;
  instrument: string;
  status: ReleaseStatus;
  date: string;
  validFrom: string;
  validTo: string | null;
  /** SHA-256 over the release's inputs (content files), to detect changes after publishing. */
  inputsSha256: string;
  parameters: Record<string, unknown>;
  files: ManifestFile[];
}

export interface Check {
  /** Stable id, e.g. "rmf.rows.sum-le-1". */
  id: string;
  title: string;
  /** Product id the check is about, or null for release-level checks. */
  product: string | null;
  status: CheckStatus;
  measured: number | string | null;
  tolerance: number | string | null;
  unit: string | null;
  message: string;
  /** Present when status is `accepted`. */
  acceptance?: Acceptance;
}

export interface ValidationReport {
  schema: 'kiln/validation/1';
  release: string;
  checks: Check[];
}

export interface ParameterRow {
  detector: string | null;
  group: string;
  name: string;
  symbol: string | null;
  unit: string;
  value: number;
  uncertainty: number | null;
  /** "fit" (from line fits), "input" (stated in content), "law" (derived). */
  source: 'fit' | 'input' | 'law';
}

export interface EfficiencyComponent {
  name: string;
  kind: 'mirror' | 'filter' | 'contamination' | 'surface' | 'detector';
  /** Transmission (filters, layers) or absorption probability (detector), aligned with energyKeV. */
  values: number[];
}

export interface EpochSite {
  id: string;
  /** Reference date of the epoch (ISO). */
  date: string;
  validFrom: string;
  validTo: string | null;
  energyKeV: number[];
  mirrorCm2: number[];
  components: EfficiencyComponent[];
  /** Detector quantum efficiency (all layers and the detector itself, no mirror). */
  detectorQE: number[];
  effectiveAreaCm2: number[];
}

export interface LineFitSite {
  line: string;
  energyKeV: number;
  centroidKeV: number;
  centroidErrEv: number;
  fwhmEv: number;
  fwhmErrEv: number;
  /** Model values at energyKeV, and residuals measured − model. */
  modelFwhmEv: number;
  fwhmResidualEv: number;
  modelCentroidKeV: number;
  centroidResidualEv: number;
  efficiency: number | null;
}

export interface ProfileSet {
  /** Channel energy centres (keV) for the rows. */
  channelEnergyKeV: number[];
  /** Energies of the rows (keV): a choice for the reader. */
  energiesKeV: number[];
  /** rows[i][c] = probability of channel c for a photon of energiesKeV[i]. */
  rows: number[][];
}

export interface MatrixImage {
  /** Release-relative path of a PNG rendered by the build (log colour scale), or null. */
  path: string | null;
  /**
   * Downsampled log10 probability grid, [energyIndex][channelIndex], -Infinity encoded as null.
   * Rows are blocks of equally many energy bins (evenly spaced in energy for a linear grid);
   * columns blocks of equally many channels, up to just above the highest photon energy.
   */
  log10: (number | null)[][];
  energyKeV: [number, number];
  channelEnergyKeV: [number, number];
  log10Range: [number, number];
}

export interface DetectorSite {
  id: string;
  name: string;
  kind: string;
  epochs: EpochSite[];
  /** Model curves on a plotting grid. */
  resolution: { energyKeV: number[]; fwhmEv: number[]; centroidOffsetEv: number[] };
  lineFits: LineFitSite[];
  /**
   * χ² of the published model (the release's laws or interpolation, as built) against the line
   * fits, with dof = number of lines (nothing is fitted here). The fits of the laws to the same
   * lines, with their own χ² and dof, are in the parameter rows (source "fit").
   */
  fitQuality: { fwhmChi2: number; fwhmDof: number; centroidChi2: number; centroidDof: number };
  profiles: ProfileSet;
  matrix: MatrixImage;
}

export interface ReleaseSite {
  schema: 'kiln/release-site/1';
  id: string;
  instrument: string;
  title: string;
  date: string;
  status: ReleaseStatus;
  validFrom: string;
  validTo: string | null;
  supersedes: string | null;
  /** Markdown of the release notes (the site renders and sanitises it). */
  notesMarkdown: string;
  parameters: ParameterRow[];
  detectors: DetectorSite[];
  products: ProductSummary[];
}
