/**
 * One unit of build work: a detector of a release, with everything needed to make its products.
 * Plain data (structured-clone safe) so jobs can cross into worker threads.
 */
import type { MirrorAreaTable } from '../physics/arf.ts';
import type { ResolvedDetector } from '../content/types.ts';
import type { ChannelGrid, EnergyGridSpec } from '../response/model-types.ts';
import type { ProductKind } from '../site-data/types.ts';
import type { CheckSettings } from './check-settings.ts';
import type { ProductsPer } from '../model/regions.ts';
import type { ModelDocument } from '../model/types.ts';

export interface DetectorJob {
  release: { id: string; date: string; validFrom: string; validTo: string | null; products: ProductKind[]; productsPer?: ProductsPer };
  instrument: {
    id: string;
    telescope: string;
    instrument: string;
    channels: ChannelGrid;
    energyGrid: EnergyGridSpec;
    mirror: MirrorAreaTable;
  };
  detector: ResolvedDetector;
  /** How its checks are judged (release status and stated tolerances); defaults when absent. */
  checks?: CheckSettings;
  /** SHA-256 of the model document the job was read from (recorded in each product's HISTORY); absent for jobs made without one. */
  modelSha256?: string;
  /** The whole model document: when present, the job rebuilds each product from it through the case path and checks the bytes. */
  rebuildFrom?: ModelDocument;
}

/** A product file before compression. */
export interface BuiltFile {
  id: string;
  kind: ProductKind;
  detector: string;
  /** Epoch id; for an RMF valid across all of the detector's epochs, "all". */
  epoch: string;
  /** Readout node and row band of a per-region product (absent: the whole detector). */
  node?: string;
  rowBand?: string;
  /** File name inside the release's files/ directory (compressed: ends in .gz). */
  name: string;
  fits: Uint8Array;
  validFrom: string;
  validTo: string | null;
  /** Energy range (keV) and, for matrices, channel range the model covers completely. */
  validEnergyKeV?: [number, number];
  validChannels?: [number, number];
}
