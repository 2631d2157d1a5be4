/**
 * Per-energy comparison tables of two responses (pure): effective-area ratios, and differences of
 * the matrix core (centroid, FWHM) and of the row sums, on a common set of probe energies.
 */
import { arfAt, bracket, fitCoreAt, lerpAt, rowSums } from '../checks/index.ts';
import type { ArfData, RmfData } from '../response/types.ts';
import { exp, log } from '../numeric/index.ts';

const EV_PER_KEV = 1000;
/** Probe energies per comparison, log-spaced over the common range (Kiln's choice: a readable table). */
export const DEFAULT_PROBES = 16;

export interface RmfDiffRow {
  energyKeV: number;
  centroidAKeV: number | null;
  centroidDiffEv: number | null;
  fwhmAEv: number | null;
  fwhmDiffEv: number | null;
  rowSumA: number;
  rowSumDiff: number;
}

export interface ArfDiffRow {
  energyKeV: number;
  areaACm2: number;
  areaBCm2: number;
  /** B / A; null where A has no area. */
  ratio: number | null;
}

export function probeEnergies(loA: number, hiA: number, loB: number, hiB: number, n = DEFAULT_PROBES): number[] {
  const lo = Math.max(loA, loB);
  const hi = Math.min(hiA, hiB);
  if (!(hi > lo)) return [];
  const a = log(lo);
  const b = log(hi);
  return Array.from({ length: n }, (_, i) => exp(a + ((b - a) * (i + 0.5)) / n));
}

const last = (x: Float64Array) => x[x.length - 1];

export function rmfDiffTable(a: RmfData, b: RmfData, energies?: number[]): RmfDiffRow[] {
  const es = energies ?? probeEnergies(a.energLoKeV[0], last(a.energHiKeV), b.energLoKeV[0], last(b.energHiKeV));
  const sa = rowSums(a);
  const sb = rowSums(b);
  return es.map((e) => {
    const ca = fitCoreAt(a, e);
    const cb = fitCoreAt(b, e);
    const rowSumA = lerpAt(sa, bracket(a.energLoKeV, a.energHiKeV, e));
    const rowSumB = lerpAt(sb, bracket(b.energLoKeV, b.energHiKeV, e));
    return {
      energyKeV: e,
      centroidAKeV: ca ? ca.centroidKeV : null,
      centroidDiffEv: ca && cb ? (cb.centroidKeV - ca.centroidKeV) * EV_PER_KEV : null,
      fwhmAEv: ca ? ca.fwhmEv : null,
      fwhmDiffEv: ca && cb ? cb.fwhmEv - ca.fwhmEv : null,
      rowSumA,
      rowSumDiff: rowSumB - rowSumA,
    };
  });
}

export function arfDiffTable(a: ArfData, b: ArfData, energies?: number[]): ArfDiffRow[] {
  const es = energies ?? probeEnergies(a.energLoKeV[0], last(a.energHiKeV), b.energLoKeV[0], last(b.energHiKeV));
  return es.map((e) => {
    const areaACm2 = arfAt(a, e);
    const areaBCm2 = arfAt(b, e);
    return { energyKeV: e, areaACm2, areaBCm2, ratio: areaACm2 > 0 ? areaBCm2 / areaACm2 : null };
  });
}
