/**
 * The published model document (schema kiln/model/1): everything the generator used to make a
 * release's products — per detector the resolved layer stack, contamination law, redistribution
 * model with fitted values, line fits, epochs and regions; the instrument's grids and mirror
 * area; the element interaction data of every element in the stacks — so that the products can
 * be rebuilt from this one file (`kiln response`, the site's response page, the build's rebuild
 * check). The JSON Schema is model-schema.ts.
 */
import type { ResolvedDetector } from '../content/types.ts';
import type { XrayTable } from '../physics/data/xray-table-types.ts';
import type { ChannelGrid, EnergyGridSpec } from '../response/model-types.ts';
import type { ProductKind } from '../site-data/types.ts';
import type { ProductsPer } from './regions.ts';

export const MODEL_SCHEMA = 'kiln/model/1';
/** File name of the document in a release's output and archive. */
export const MODEL_FILE = 'model.json';
export const MODEL_SCHEMA_FILE = 'model.schema.json';

export interface ModelDocument {
  schema: typeof MODEL_SCHEMA;
  release: {
    id: string;
    date: string;
    validFrom: string;
    validTo: string | null;
    products: ProductKind[];
    productsPer: ProductsPer;
  };
  instrument: {
    id: string;
    telescope: string;
    instrument: string;
    channels: ChannelGrid;
    energyGrid: EnergyGridSpec;
    mirror: { energyKeV: number[]; areaCm2: number[] };
  };
  /** Element data of the elements the stacks use (a subset of the project's xraylib-derived table). */
  interaction: XrayTable;
  detectors: ResolvedDetector[];
}
