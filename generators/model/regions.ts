/**
 * The regions a product can be made for: the whole detector, a readout node (all rows), or a node
 * in one row band. Each carries its redistribution model and the transfer counts its charge makes.
 * Pure.
 */
import type { ResolvedDetector, ResolvedRegions } from '../content/types.ts';
import type { TransferBand, TransferLossLaw } from '../physics/transfer-loss.ts';
import type { RedistributionSpec } from '../response/model-types.ts';
import { KilnInputError } from '../errors.ts';

export type ProductsPer = 'detector' | 'node' | 'node-row';

export interface Region {
  /** Detector id, "<detector>-<node>" or "<detector>-<node>-<band>": the product label. */
  label: string;
  node: string | null;
  rowBand: string | null;
  spec: RedistributionSpec;
  /** Transfer counts of the region's charge; null when the detector has no regions. */
  band: TransferBand | null;
}

const wholeDetector = (g: ResolvedRegions): TransferBand => ({ firstTransfer: 0, lastTransfer: g.transfers - 1 });

/** The transfer-loss input of the matrix builder for a region (null: none). */
export function transferLossOf(r: Region): { law: TransferLossLaw; band: TransferBand } | null {
  const t = r.spec.transferLoss;
  if (!t || t.source !== 'law' || !r.band) return null;
  return { law: { lossPerTransfer: t.lossPerTransfer, energyIndex: t.energyIndex, referenceKeV: t.referenceKeV }, band: r.band };
}

export function detectorRegion(d: ResolvedDetector): Region {
  return { label: d.id, node: null, rowBand: null, spec: d.redistribution, band: d.regions ? wholeDetector(d.regions) : null };
}

/** The regions a release builds products for, in a fixed order (nodes as listed, bands as listed). */
export function regionsOf(d: ResolvedDetector, per: ProductsPer): Region[] {
  if (per === 'detector' || !d.regions) return [detectorRegion(d)];
  const g = d.regions;
  const out: Region[] = [];
  for (const n of g.nodes) {
    if (per === 'node') out.push({ label: `${d.id}-${n.id}`, node: n.id, rowBand: null, spec: n.redistribution, band: wholeDetector(g) });
    else
      for (const b of g.rowBands)
        out.push({ label: `${d.id}-${n.id}-${b.id}`, node: n.id, rowBand: b.id, spec: n.redistribution, band: { firstTransfer: b.firstTransfer, lastTransfer: b.lastTransfer } });
  }
  return out;
}

/**
 * The region of a position: node (null = whole detector) and row (null = all rows; else the row
 * band holding that row). Bad positions name the field, the value and what the detector has.
 */
export function regionAt(d: ResolvedDetector, node: string | null, row: number | null): Region {
  const g = d.regions;
  if (!g) {
    if (node !== null) throw new KilnInputError(`detector ${d.id} has no readout nodes`, { field: 'node', value: node, expected: 'no node (the detector is one region)' });
    if (row !== null) throw new KilnInputError(`detector ${d.id} has no row bands`, { field: 'row', value: row, expected: 'no row (the detector is one region)' });
    return detectorRegion(d);
  }
  const n = node === null ? null : g.nodes.find((x) => x.id === node);
  if (n === undefined) throw new KilnInputError(`no node "${node}" on detector ${d.id}`, { field: 'node', value: node, expected: `one of ${g.nodes.map((x) => x.id).join(', ')}` });
  if (row !== null && !(Number.isInteger(row) && row >= 0 && row < g.transfers))
    throw new KilnInputError(`row outside detector ${d.id}`, { field: 'row', value: row, expected: `a whole number in [0, ${g.transfers - 1}]` });
  const b = row === null ? null : g.rowBands.find((x) => row >= x.firstTransfer && row <= x.lastTransfer);
  if (b === undefined)
    throw new KilnInputError(`row ${row} lies in no row band of detector ${d.id}`, {
      field: 'row',
      value: row,
      expected: `a row in ${g.rowBands.map((x) => `${x.id} [${x.firstTransfer}, ${x.lastTransfer}]`).join(', ')}`,
    });
  const spec = n ? n.redistribution : d.redistribution;
  const band = b ? { firstTransfer: b.firstTransfer, lastTransfer: b.lastTransfer } : wholeDetector(g);
  const label = [d.id, ...(n ? [n.id] : []), ...(b ? [b.id] : [])].join('-');
  return { label, node: n ? n.id : null, rowBand: b ? b.id : null, spec, band };
}
