/**
 * One row of a published RMF at a photon energy the reader chose: the energy bin containing it,
 * the row expanded to every channel, and the channel energies (EBOUNDS centres). Pure.
 */
import { expandRow } from '../../../generators/response/compress.ts';
import { binIndexOf } from '../../../generators/response/grid.ts';
import type { RmfData } from '../../../generators/response/types.ts';

export interface PublishedRow {
  /** Zero-based index of the energy bin (row of the MATRIX table). */
  bin: number;
  binLoKeV: number;
  binHiKeV: number;
  /** Channel energy centres, (E_MIN + E_MAX) / 2 of EBOUNDS. */
  channelEnergyKeV: number[];
  /** Probability per channel, every channel (zeros outside the row's groups). */
  probability: number[];
}

/** The energy grid's outer edges, [first ENERG_LO, last ENERG_HI] in keV. */
export function energyGridKeV(d: RmfData): [number, number] {
  return [d.energLoKeV[0], d.energHiKeV[d.energHiKeV.length - 1]];
}

/**
 * Index of the bin with ENERG_LO ≤ E < ENERG_HI (the grid's top edge belongs to the last bin),
 * or -1 outside the grid. Bins are contiguous and increasing in an OGIP RMF: binary search.
 */
export function binContaining(d: RmfData, energyKeV: number): number {
  return binIndexOf(d.energLoKeV, d.energHiKeV, energyKeV);
}

/** The row at energyKeV; throws an Error naming the grid range when the energy lies outside it. */
export function rowAtEnergy(d: RmfData, energyKeV: number): PublishedRow {
  const bin = binContaining(d, energyKeV);
  if (bin < 0) {
    const [a, b] = energyGridKeV(d);
    throw new RangeError(`${energyKeV} keV is outside the matrix energy grid, ${a}–${b} keV`);
  }
  const probability = Array.from(expandRow(d.rows[bin], d.detchans, d.firstChannel));
  const channelEnergyKeV = Array.from(d.ebounds.eMinKeV, (e, i) => (e + d.ebounds.eMaxKeV[i]) / 2);
  return { bin, binLoKeV: d.energLoKeV[bin], binHiKeV: d.energHiKeV[bin], channelEnergyKeV, probability };
}

/** Bin edges with just enough decimals to tell them apart: one more than the bin width's first digit. */
export function binRangeText(loKeV: number, hiKeV: number): string {
  const width = hiKeV - loKeV;
  const decimals = width > 0 ? Math.min(6, Math.max(0, Math.ceil(-Math.log10(width)) + 1)) : 4;
  return `${loKeV.toFixed(decimals)}–${hiKeV.toFixed(decimals)}`;
}

/** The row as CSV (channel energy, probability), full precision, for the reader to take away. */
export function rowCsv(r: PublishedRow, header: string): string {
  return `# ${header}\nchannel_energy_keV,probability\n${r.channelEnergyKeV.map((e, i) => `${e},${r.probability[i]}`).join('\n')}\n`;
}
