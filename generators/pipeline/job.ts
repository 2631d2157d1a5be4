/**
 * One unit of build work: a detector of a release, with everything needed to make its products.
 * Plain data (structured-clone safe) so jobs can cross into worker threads.
 */
import type { MirrorAreaTable } from '../physics/arf.ts';
import type { ResolvedDetector } from '../content/types.ts';
import type { ChannelGrid, EnergyGridSpec } from '../response/model-types.ts';
import type { ProductKind } from '../site-data/types.ts';
import type { CheckSettings } from './check-settings.ts';

export interface DetectorJob {
  release: { id: string; date: string; validFrom: string; validTo: string | null; products: ProductKind[] };
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
}

/** A product file before compression. */
export interface BuiltFile {
  id: string;
  kind: ProductKind;
  detector: string;
  /** Epoch id; for an RMF valid across all of the detector's epochs, "all". */
  epoch: string;
  /** File name inside the release's files/ directory (compressed: ends in .gz). */
  name: string;
  fits: Uint8Array;
  validFrom: string;
  validTo: string | null;
  /** Energy range (keV) and, for matrices, channel range the model covers completely. */
  validEnergyKeV?: [number, number];
  validChannels?: [number, number];
}
