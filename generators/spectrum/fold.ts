/**
 * Forward folding: expected counts in channel c = T Σ_E F_E · A_E · R(c, E), with F_E the photon
 * flux integrated over energy bin E (flux.ts), A_E the effective area and R the redistribution.
 */
import type { FoldingResponse } from './response.ts';

/** Expected counts per channel (0-based channel index) for the bin fluxes over an exposure in seconds. */
export function foldCounts(r: FoldingResponse, binFlux: Float64Array, exposureS: number, out: Float64Array = new Float64Array(r.detchans)): Float64Array {
  out.fill(0);
  const n = r.energLoKeV.length;
  const { rowGroup, groupChannel, groupLength, groupOffset, value, areaCm2 } = r;
  for (let i = 0; i < n; i++) {
    const w = exposureS * binFlux[i] * areaCm2[i];
    if (w === 0) continue;
    for (let g = rowGroup[i]; g < rowGroup[i + 1]; g++) {
      const c0 = groupChannel[g];
      const k0 = groupOffset[g] - c0;
      const end = c0 + groupLength[g];
      for (let c = c0; c < end; c++) out[c] += w * value[k0 + c];
    }
  }
  return out;
}

export interface Band {
  name: string;
  loKeV: number;
  hiKeV: number;
}

export interface BandRate extends Band {
  /** Expected counts in the band over the exposure. */
  counts: number;
  /** Counts per second. */
  rateCps: number;
}

/** Channels whose nominal EBOUNDS centre lies in [lo, hi) make up a band. */
export function bandChannels(r: FoldingResponse, b: Band): [number, number] {
  let first = -1;
  let last = -2;
  for (let c = 0; c < r.detchans; c++) {
    const mid = 0.5 * (r.channelLoKeV[c] + r.channelHiKeV[c]);
    if (mid >= b.loKeV && mid < b.hiKeV) {
      if (first < 0) first = c;
      last = c;
    }
  }
  return [first, last];
}

export function bandRates(r: FoldingResponse, counts: Float64Array, exposureS: number, bands: readonly Band[]): BandRate[] {
  return bands.map((b) => {
    const [first, last] = bandChannels(r, b);
    let s = 0;
    for (let c = first; c >= 0 && c <= last; c++) s += counts[c];
    return { ...b, counts: s, rateCps: s / exposureS };
  });
}

export function sum(a: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i];
  return s;
}
