/**
 * Energy grids (bins of true photon energy) and channel bounds (nominal energy of PI channels).
 * Bad grids are user mistakes: KilnInputError names the field and the bad value.
 */
import { KilnInputError } from '../errors.ts';
import type { ChannelGrid, EnergyGridSpec } from './model-types.ts';
import { pow } from '../numeric/index.ts';

const EV_PER_KEV = 1000;

export interface EnergyBins {
  loKeV: Float64Array;
  hiKeV: Float64Array;
}

/** Bins from an EnergyGridSpec: `bins` equal steps in E (linear) or in ln E (log), contiguous. */
export function energyGrid(spec: EnergyGridSpec, field = 'energyGrid', file?: string): EnergyBins {
  const { minKeV, maxKeV, bins, spacing } = spec;
  if (!(Number.isFinite(minKeV) && minKeV > 0))
    throw new KilnInputError('energy grid minimum must be > 0', { file, field: `${field}.minKeV`, value: minKeV, expected: '> 0 keV' });
  if (!(Number.isFinite(maxKeV) && maxKeV > minKeV))
    throw new KilnInputError('energy grid maximum must exceed its minimum', { file, field: `${field}.maxKeV`, value: maxKeV, expected: `> minKeV (${minKeV})` });
  if (!(Number.isInteger(bins) && bins >= 1))
    throw new KilnInputError('energy grid needs a whole number of bins', { file, field: `${field}.bins`, value: bins, expected: 'an integer ≥ 1' });
  if (spacing !== 'linear' && spacing !== 'log')
    throw new KilnInputError('unknown energy grid spacing', { file, field: `${field}.spacing`, value: spacing, expected: '"linear" or "log"' });
  const edges = new Float64Array(bins + 1);
  for (let i = 0; i <= bins; i++) {
    const t = i / bins;
    edges[i] = spacing === 'linear' ? minKeV + (maxKeV - minKeV) * t : minKeV * pow(maxKeV / minKeV, t);
  }
  edges[0] = minKeV;
  edges[bins] = maxKeV;
  return { loKeV: edges.slice(0, bins), hiKeV: edges.slice(1) };
}

/** Validates explicit bins: finite, lo < hi, ascending, no overlaps (gaps are allowed). */
export function checkEnergyBins(bins: EnergyBins, field = 'energyBins', file?: string): EnergyBins {
  const { loKeV, hiKeV } = bins;
  if (loKeV.length !== hiKeV.length || loKeV.length === 0)
    throw new KilnInputError('energy bins need matching, non-empty lower and upper bounds', { file, field, value: `${loKeV.length} vs ${hiKeV.length}` });
  for (let i = 0; i < loKeV.length; i++) {
    if (!(Number.isFinite(loKeV[i]) && loKeV[i] > 0))
      throw new KilnInputError('energy bin lower bound must be > 0', { file, field: `${field}.loKeV[${i}]`, value: loKeV[i], expected: '> 0 keV' });
    if (!(hiKeV[i] > loKeV[i]) || !Number.isFinite(hiKeV[i]))
      throw new KilnInputError('energy bin upper bound must exceed its lower bound', { file, field: `${field}.hiKeV[${i}]`, value: hiKeV[i], expected: `> ${loKeV[i]}` });
    if (i > 0 && loKeV[i] < hiKeV[i - 1])
      throw new KilnInputError('energy bins overlap or are not ascending', { file, field: `${field}.loKeV[${i}]`, value: loKeV[i], expected: `≥ ${hiKeV[i - 1]} (upper bound of bin ${i - 1})` });
  }
  return bins;
}

export function checkChannelGrid(g: ChannelGrid, field = 'channels', file?: string): void {
  if (!(Number.isInteger(g.count) && g.count >= 1))
    throw new KilnInputError('channel count must be a whole number ≥ 1', { file, field: `${field}.count`, value: g.count, expected: 'an integer ≥ 1' });
  if (g.firstChannel !== 0 && g.firstChannel !== 1)
    throw new KilnInputError('first channel must be 0 or 1', { file, field: `${field}.firstChannel`, value: g.firstChannel, expected: '0 or 1' });
  if (!(Number.isFinite(g.widthEv) && g.widthEv > 0))
    throw new KilnInputError('channel width must be > 0', { file, field: `${field}.widthEv`, value: g.widthEv, expected: '> 0 eV (channels ascending in energy)' });
  if (!Number.isFinite(g.originEv))
    throw new KilnInputError('channel origin must be a finite number', { file, field: `${field}.originEv`, value: g.originEv, expected: 'eV' });
}

/** The count + 1 channel boundaries in keV: boundary j is the lower edge of the j-th channel (0-based). */
export function channelBoundsKeV(g: ChannelGrid, field = 'channels', file?: string): Float64Array {
  checkChannelGrid(g, field, file);
  const b = new Float64Array(g.count + 1);
  for (let j = 0; j <= g.count; j++) b[j] = (g.originEv + j * g.widthEv) / EV_PER_KEV;
  return b;
}

/**
 * Index of the bin with lo ≤ E < hi of a contiguous increasing grid (the top edge belongs to the
 * last bin), or −1 outside it. Binary search.
 */
export function binIndexOf(loKeV: ArrayLike<number>, hiKeV: ArrayLike<number>, energyKeV: number): number {
  const n = loKeV.length;
  if (!(n > 0) || !Number.isFinite(energyKeV) || energyKeV < loKeV[0] || energyKeV > hiKeV[n - 1]) return -1;
  let a = 0;
  let b = n - 1;
  while (a < b) {
    const m = (a + b + 1) >> 1;
    if (loKeV[m] <= energyKeV) a = m;
    else b = m - 1;
  }
  return energyKeV < hiKeV[a] || a === n - 1 ? a : -1;
}
