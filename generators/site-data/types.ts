/**
 * The contract between the build (generators/pipeline) and the site (src/): every number a page
 * shows comes from these JSON documents, which the build writes and the pages only read.
 * Each array of values is aligned with the energy grid named beside it. Units are in the names.
 *
 * Layout written by `kiln build --out DIR` (default `.kiln/out`); `<id>` in a path is the release's
 * key, its folder name (the id, or `<instrument>~<id>`: content/release-key.ts):
 *   DIR/index.json                         ReleaseIndex
 *   DIR/finder/<instrument>/<det>.json     FinderManifestDoc (one detector's file lists: what each chunk holds)
 *   DIR/finder/<instrument>/<det>/<k>.json FinderChunkDoc (chunk k: at most FINDER_CHUNK_PRODUCTS files, whole releases where they fit)
 *   DIR/releases/<id>/manifest.json        ReleaseManifest
 *   DIR/releases/<id>/validation.json      ValidationReport
 *   DIR/releases/<id>/summary.json                       ReleaseSummaryDoc (small: what a page shows on load)
 *   DIR/releases/<id>/overlay.json                       ReleaseOverlayDoc (every detector's curves, thinned, for the overlay plots)
 *   DIR/releases/<id>/detectors/<det>/model.json         DetectorModelDoc  (RMF side: curves, line fits, parameters, products)
 *   DIR/releases/<id>/detectors/<det>/profiles.json      DetectorProfilesDoc (line profiles, fetched when plotted)
 *   DIR/releases/<id>/detectors/<det>/matrix.json        DetectorMatrixDoc (the build's source of the matrix picture)
 *   DIR/releases/<id>/detectors/<det>/checks.json        DetectorChecksDoc (checks of the detector's products)
 *   DIR/releases/<id>/detectors/<det>/epochs/<ep>.json   EpochDataDoc      (ARF side: one epoch's area and efficiency)
 *   DIR/releases/<id>/detectors/<det>/area.json          DetectorAreaDoc   (every epoch's effective area alone, for comparisons)
 *   DIR/releases/<id>/detectors/<det>/supplement.json    DetectorSupplementDoc (archived releases: curves their site data predate)
 *   DIR/releases/<id>/spectral.json                      ReleaseSpectral (reference sources: predicted rates, impact)
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
  /**
   * Named configurations (filter positions), when the instrument declares them: products of
   * detector D in configuration C have detector `D.C` and `filter: C`.
   */
  configurations?: { id: string; title: string; filter: string }[];
}

export interface ProductSummary {
  /** Unique within the release, e.g. "fi0-e2-rmf". */
  id: string;
  kind: ProductKind;
  detector: string;
  /** Configuration (filter position) id of an instrument with configurations; absent otherwise. */
  filter?: string;
  /** Readout node and row band of a per-region product; absent for a whole-detector product. */
  node?: string;
  rowBand?: string;
  epoch: string;
  /** Release-relative path, e.g. "files/fi0_e2_v1.2.0.rmf.gz". */
  path: string;
  bytes: number;
  sha256: string;
  /** Observation dates this product applies to: [validFrom, validTo) ISO dates; validTo null = open. */
  validFrom: string;
  validTo: string | null;
  /** Energy range (keV) and, for matrices, channels the model covers completely (absent in archives made before they were stated). */
  validEnergyKeV?: [number, number];
  validChannels?: [number, number];
}

export interface ReleaseSummary {
  id: string;
  instrument: string;
  /**
   * Where the release lives: its folder name under releases/ (build output, archive, site URLs
   * /releases/<key>/ and /data/releases/<key>/), the id or `<instrument>~<id>`.
   */
  key: string;
  /** Key of the release it supersedes (same instrument), or null. */
  supersedesKey: string | null;
  title: string;
  date: string;
  status: ReleaseStatus;
  validFrom: string;
  validTo: string | null;
  supersedes: string | null;
  /** `accepted` is absent in indexes of builds before review sign-off existed. */
  checks: { pass: number; fail: number; warn: number; review: number; accepted?: number };
  products: ProductSummary[];
  /** The release's model document (kiln/model/1), relative to the release; absent for archives sealed before model documents. */
  model?: { path: string; bytes: number; sha256: string };
  /** Archived releases: what today's checks find that the published report did not (reexamined.json). */
  reexamined?: ReexaminedCounts;
}

/** Findings of a re-examination by status, and how many checks ran. */
export interface ReexaminedCounts {
  fail: number;
  warn: number;
  checks: number;
}

/** A check that fails or warns today on an archived release's bytes, and how it stood at publication. */
export interface ReexaminedFinding extends Check {
  /** Status in the published report; null when that report has no such check (a newer check). */
  publishedStatus: CheckStatus | null;
}

/**
 * releases/<id>/reexamined.json: today's checks run read-only on an archived release's bytes at
 * each build (README, "Re-examined with current checks"). The archive itself is never touched.
 */
export interface ReexaminationDoc {
  schema: 'kiln/reexamination/1';
  release: string;
  /** Version of the Kiln generator whose checks ran (a digest of its code). */
  generator: string;
  counts: ReexaminedCounts;
  /** Fail and warn results that are new or worse than at publication, worst first. */
  findings: ReexaminedFinding[];
  /** Detectors whose products could not be re-examined, with the reason. */
  skipped: { detector: string; reason: string }[];
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
  /** Readout node and row band of a per-region product; absent for a whole-detector product. */
  node?: string;
  rowBand?: string;
  epoch: string;
  validFrom: string;
  validTo: string | null;
  /** Energy range (keV) and, for matrices, channels the model covers completely (absent in archives made before they were stated). */
  validEnergyKeV?: [number, number];
  validChannels?: [number, number];
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
  /*
   * The fields below are absent in archives published before the site plotted the profile
   * parameters and line efficiencies (their site.json is kept as published).
   */
  efficiencyErr?: number | null;
  tailFraction?: number;
  tailFractionErr?: number;
  shelfFraction?: number;
  shelfFractionErr?: number | null;
  /**
   * The whole matrix row at the line energy refitted with core + tail + shelf by the closure
   * checks (closure.tail-fraction.*, closure.shelf.*): what a line fit would measure on the
   * product; null when the row could not be refitted.
   */
  refitTailFraction?: number | null;
  refitShelfFraction?: number | null;
  /** Model line efficiency at the line energy as closure.efficiency.* computes it; null without a measured efficiency. */
  modelEfficiency?: number | null;
}

/** How the published model's tail is made (the tail curve means a different thing for each). */
export type TailSource = 'law' | 'line-fits' | 'collection';

/**
 * Model line efficiency on the matrix energy grid (thinned where linear interpolation stays within
 * 1e-4 of the curve): the first epoch's detector QE (the ARF's bin averages, no mirror) × the
 * matrix row's detected fraction (its sum over channels above the threshold), as the measured
 * line efficiencies count events per photon on the detector.
 */
export interface EfficiencyCurve {
  epoch: string;
  energyKeV: number[];
  detected: number[];
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

/** One region's model curves (site data of a per-node or per-node × row-band release). */
export interface RegionCurves {
  /** The product label, e.g. "bi1-b" or "bi1-b-top". */
  label: string;
  node: string;
  rowBand: string | null;
  fwhmEv: number[];
  centroidOffsetEv: number[];
  /** Model tail and shelf fractions, on the same energies; absent in older archives. */
  tailFraction?: number[];
  shelfFraction?: number[];
  /** Model line efficiency with this region's matrix, on the detector's `efficiency.energyKeV`. */
  efficiencyDetected?: number[];
}

export interface DetectorSite {
  id: string;
  name: string;
  kind: string;
  epochs: EpochSite[];
  /**
   * Model curves on a plotting grid. tailFraction: the tail's share of events (law or line-fit
   * interpolation; for tail source "collection", the partial-charge share of the sensor's partially
   * collecting layer); shelfFraction: the shelf's share. Both absent in older archives.
   */
  resolution: { energyKeV: number[]; fwhmEv: number[]; centroidOffsetEv: number[]; tailFraction?: number[]; shelfFraction?: number[]; tailSource?: TailSource };
  /** Model line efficiency (absent in older archives). */
  efficiency?: EfficiencyCurve;
  /** Set when the tail, shelf and efficiency curves come from an archive's supplement (the generator that computed them), not its published site data. */
  supplementedBy?: string;
  /**
   * The same curves for each region the release builds products for (readout node, or node × row
   * band: its own noise, gain and transfer loss), on the same energies; absent when the release
   * builds whole-detector products only.
   */
  regions?: RegionCurves[];
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

/**
 * The whole release in one object: the archive's format (`content/archive/<id>/site.json`, kept
 * as published) and the in-memory join of the split documents below. Pages never fetch it whole.
 */
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

/** One detector of a release as listed by the summary; its data sit in detectors/<id>/. */
export interface DetectorEntry {
  id: string;
  name: string;
  kind: string;
  epochs: { id: string; date: string; validFrom: string; validTo: string | null }[];
  products: number;
  checks: { pass: number; fail: number; warn: number; review: number; accepted: number };
}

/** What a release page needs on load, independent of the number of products per detector. */
export interface ReleaseSummaryDoc {
  schema: 'kiln/release-summary/1';
  id: string;
  instrument: string;
  title: string;
  date: string;
  status: ReleaseStatus;
  validFrom: string;
  validTo: string | null;
  supersedes: string | null;
  notesMarkdown: string;
  /** Parameters not tied to a detector (usually none). */
  parameters: ParameterRow[];
  /** Release-level checks (product null, or a product no detector lists). */
  checks: Check[];
  counts: { pass: number; fail: number; warn: number; review: number; accepted: number };
  products: number;
  detectors: DetectorEntry[];
}

/** A curve of the overlay document: thinned points of a detector document's curve. */
export interface OverlayCurve {
  energyKeV: number[];
  values: number[];
}

export interface OverlayRegion {
  label: string;
  node: string;
  rowBand: string | null;
  fwhmEv: OverlayCurve;
  centroidOffsetEv: OverlayCurve;
  /** Only where the region's model differs from its detector's. */
  tailFraction?: OverlayCurve;
  shelfFraction?: OverlayCurve;
  efficiency?: OverlayCurve;
}

/** One detector in the overlay: its model curves; tail, shelf and efficiency absent in older archives. */
export interface OverlayDetector {
  id: string;
  name: string;
  kind: string;
  fwhmEv: OverlayCurve;
  centroidOffsetEv: OverlayCurve;
  tailFraction?: OverlayCurve;
  shelfFraction?: OverlayCurve;
  tailSource?: TailSource;
  /** Model line efficiency (EfficiencyCurve) of the named epoch's QE. */
  efficiency?: OverlayCurve & { epoch: string };
  /** The latest epoch's effective area. */
  effectiveAreaCm2?: OverlayCurve & { epoch: string };
  regions?: OverlayRegion[];
}

/** releases/<id>/overlay.json: what the release page's overlay plots fetch (one small document for all detectors); `release` is the id, as in the other documents. */
export interface ReleaseOverlayDoc {
  schema: 'kiln/release-overlay/1';
  release: string;
  detectors: OverlayDetector[];
}

/** The RMF side of one detector: model curves, line fits, parameters and the detector's products. */
export interface DetectorModelDoc {
  schema: 'kiln/detector-model/1';
  release: string;
  id: string;
  name: string;
  kind: string;
  /** The epochs whose documents are in epochs/ (same list as the summary's entry). */
  epochs: DetectorEntry['epochs'];
  resolution: DetectorSite['resolution'];
  efficiency?: EfficiencyCurve;
  regions?: RegionCurves[];
  lineFits: LineFitSite[];
  fitQuality: DetectorSite['fitQuality'];
  parameters: ParameterRow[];
  products: ProductSummary[];
  /** Archived releases: curves computed at this build beside the published ones (detectors/<id>/supplement.json). */
  supplement?: true;
}

/**
 * detectors/<id>/supplement.json of an archived release: the profile and line-efficiency curves
 * its published site data predate, computed at each build from the archived matrix (read back
 * from the verified bytes) and the release's frozen inputs, as for a built release. The archive
 * and its site.json are never changed; pages show these beside the published curves.
 */
export interface DetectorSupplementDoc {
  schema: 'kiln/detector-supplement/1';
  release: string;
  detector: string;
  /** Version of the Kiln generator that computed it. */
  generator: string;
  resolution: { tailFraction: number[]; shelfFraction: number[]; tailSource: TailSource };
  efficiency?: EfficiencyCurve;
  /** Aligned with the published lineFits (same lines, same order). */
  lineFits: Partial<LineFitSite>[];
}

export interface DetectorProfilesDoc {
  schema: 'kiln/detector-profiles/1';
  release: string;
  detector: string;
  profiles: ProfileSet;
}

export interface DetectorMatrixDoc {
  schema: 'kiln/detector-matrix/1';
  release: string;
  detector: string;
  matrix: MatrixImage;
}

export interface DetectorChecksDoc {
  schema: 'kiln/detector-checks/1';
  release: string;
  detector: string;
  checks: Check[];
}

/** The ARF side: one epoch of one detector. */
export interface EpochDataDoc {
  schema: 'kiln/epoch-data/1';
  release: string;
  detector: string;
  epoch: EpochSite;
}

/** Every epoch's effective area of one detector, without the components: what a comparison reads. */
export interface DetectorAreaDoc {
  schema: 'kiln/detector-area/1';
  release: string;
  detector: string;
  /** The energy grid shared by the epochs (the first epoch's). */
  energyKeV: number[];
  /** energyKeV only where an epoch's grid differs from the shared one. */
  epochs: { id: string; energyKeV?: number[]; effectiveAreaCm2: number[] }[];
}

/**
 * finder/<instrument>/<det>.json: what the finder fetches first for a detector entry, the list of
 * its chunks (generators/site-data/finder.ts). Chunks are in the finder's order of preference
 * (status, newest release, matrix before area file), so the page loads the first chunks that can
 * hold a file for the asked date and position and the rest only on demand.
 */
export interface FinderManifestDoc {
  schema: 'kiln/finder-manifest/1';
  instrument: string;
  /** The detector's entry id: `D.C` for detector D in configuration C of an instrument with configurations. */
  detector: string;
  /** Configuration id, for an instrument with configurations. */
  filter?: string;
  /** Files of the entry in all chunks (drafts included: the finder never offers them). */
  products: number;
  /** The most files a chunk holds. */
  chunkProducts: number;
  chunks: FinderChunk[];
}

/** A chunk as the manifest lists it: enough to tell whether it can hold a file for a date and a position. */
export interface FinderChunk {
  /** Relative to the build output (the site's /data/), e.g. "finder/cam/d0/0.json". */
  path: string;
  products: number;
  /** Keys of the releases it holds files of; a release cut across chunks is in each of them. */
  releases: string[];
  /** Merged validity of its files: [validFrom, validTo) ISO dates, validTo null = open, ascending. */
  spans: [string, string | null][];
  /** Readout nodes and row bands of its per-region files (absent: none). */
  nodes?: string[];
  rowBands?: string[];
  /** It holds files made for every node (no node stated), or for every row band (none stated). */
  allNodes?: true;
  allRowBands?: true;
}

/** A file as the finder keeps it: a ProductSummary without what its documents state once (detector, filter) or the finder never shows. */
export type FinderProduct = Pick<ProductSummary, 'kind' | 'node' | 'rowBand' | 'epoch' | 'path' | 'bytes' | 'sha256' | 'validFrom' | 'validTo'>;

/** A release in a chunk: the fields the finder ranks and links by, and its files in the chunk. */
export interface FinderRelease {
  id: string;
  key: string;
  status: ReleaseStatus;
  date: string;
  /** Id of the release that supersedes it (same instrument), for a superseded release where one is known. */
  supersededBy?: string;
  products: FinderProduct[];
}

/**
 * finder/<instrument>/<det>/<k>.json: chunk k of the manifest, at most `chunkProducts` files. Each
 * file keeps its release-relative path, size and SHA-256: a hit names and verifies its download
 * without another fetch, and the same values are in the release's manifest.json.
 */
export interface FinderChunkDoc {
  schema: 'kiln/finder-chunk/1';
  instrument: string;
  detector: string;
  filter?: string;
  /** Its position in the manifest's list. */
  chunk: number;
  /** In the finder's order of preference. */
  releases: FinderRelease[];
}

/**
 * DIR/releases/<id>/spectral.json: the reference sources of the release's instrument, their
 * predicted rates and pile-up through this release's responses, and the impact of the change from
 * the release it supersedes (generators/pipeline/impact.ts, computed with generators/spectrum).
 */
export interface ReleaseSpectral {
  schema: 'kiln/release-spectral/1';
  release: string;
  /** The release the impact is computed against (the one superseded), or null. */
  comparedWith: string | null;
  bands: { name: string; loKeV: number; hiKeV: number }[];
  pileup: { frameTimeS: number; brightestCellFraction: number; leavesOut: string };
  tolerance: { shiftSigma: number; rateRatio: number; reason: string };
  sources: import('../spectrum/impact.ts').ReferenceSource[];
  /** Per detector: the products used and the predictions of each source. */
  predicted: SpectralPrediction[];
  impact: import('../spectrum/impact.ts').SourceImpact[];
}

export interface SpectralPrediction {
  detector: string;
  rmf: string;
  arf: string;
  epoch: string;
  sources: import('../spectrum/impact.ts').Prediction[];
}
