/** The loaded content tree: documents as validated, plus each release's effective per-detector inputs. */
import type { DetectorStack } from '../physics/types.ts';
import type { LineFit, RedistributionSpec } from '../response/model-types.ts';
import type { Epoch, InstrumentDoc, ReleaseDoc, SpectralDoc } from './schema.ts';
import type { MirrorArea } from './tables.ts';
import type { SourceSpec } from './source-schema.ts';

export type { Epoch, InstrumentDoc, ReleaseDoc } from './schema.ts';
export type { LineFitTable, MirrorArea } from './tables.ts';

export type ProductKindName = ReleaseDoc['products'][number];

/**
 * An instrument.yaml with its mirror area table. `dir`, `file` (and MirrorArea.file) are the paths
 * as opened, i.e. joined to the directory given to the loader, as error messages name them.
 */
export interface Instrument extends InstrumentDoc {
  dir: string;
  file: string;
  mirror: MirrorArea;
  /** Reference sources of sources/*.yaml (not part of any release's fingerprint). */
  sources?: SourceSpec[];
  /** spectral.yaml: bands, pile-up inputs and impact tolerances (not part of any release's fingerprint). */
  spectral?: SpectralDoc;
}

export interface Release extends ReleaseDoc {
  /** Its folder name under releases/: the id, or `<instrument>~<id>` (release-key.ts). */
  key: string;
  /** Key of the release it supersedes (same instrument), or null. */
  supersedesKey: string | null;
  dir: string;
  file: string;
  notesFile: string;
  notesMarkdown: string;
}

/** What the pipeline needs to build one detector of one release: instrument model with the release's overrides applied. */
export interface ResolvedDetector {
  id: string;
  name: string;
  kind: string;
  description: string;
  stack: DetectorStack;
  redistribution: RedistributionSpec;
  lineFits: LineFit[];
  /** Content-root-relative path of the line-fit CSV. */
  lineFitsFile: string;
  /** The epochs to build (the release's, or the subset listed for this detector), in time order. */
  epochs: Epoch[];
  /** Line fits measured in row bands (the CSV's region column); they feed the transfer-loss fit. */
  bandLineFits?: LineFit[];
  regions?: ResolvedRegions;
  /**
   * The configuration (filter position) this entry is built for, when the instrument declares
   * configurations: the entry's id is then `<detector>.<configuration>` and its stack carries the
   * configuration's filters. Absent for instruments without configurations.
   */
  configuration?: { id: string; filter: string; detector: string };
}

/** A detector's readout nodes (each with its own resolved model) and row bands. */
export interface ResolvedRegions {
  /** Rows of a frame: transfer counts 0 … transfers − 1. */
  transfers: number;
  nodes: { id: string; name: string; redistribution: RedistributionSpec }[];
  rowBands: { id: string; firstTransfer: number; lastTransfer: number }[];
}

/** A file the release was built from, for hashing (inputsSha256). */
export interface InputFile {
  /** Content-root-relative, "/"-separated. */
  path: string;
  bytes: Uint8Array;
}

export interface ResolvedRelease {
  release: Release;
  instrument: Instrument;
  /** In the order release.yaml lists them. */
  detectors: ResolvedDetector[];
  /** Every file read for this release, sorted by path. */
  inputs: InputFile[];
}

export interface ContentTree {
  /** The directory given to loadContent. */
  root: string;
  /** Sorted by id. */
  instruments: Instrument[];
  /** Sorted by semantic version, oldest first (ties by instrument id). */
  releases: ResolvedRelease[];
}
