/**
 * Cross-release comparison: two RMFs or two ARFs of the same detector, read on a common set of
 * energies. Differences beyond the tolerances are not errors but changes a reviewer must accept:
 * they get status 'review'; within tolerance they pass.
 */
import type { ArfData, RmfData } from '../response/types.ts';
import { fitCoreAt } from './gaussian-core.ts';
import { arfAt, bracket, lerpAt } from './interpolate.ts';
import { fmt, makeCheck } from './make-check.ts';
import { rowSums } from './numbers-rmf.ts';
import { expandRow } from '../response/compress.ts';
import { plural } from '../plural.ts';
import { DEFAULT_COMPARE_TOLERANCES, type CompareTolerances } from './tolerances.ts';
import type { Check } from './types.ts';
import { exp, log } from '../numeric/index.ts';

const EV_PER_KEV = 1000;
/** Ignore energies where the older area is below this fraction of its peak: ratios of tiny areas are noise (Kiln's choice). */
export const AREA_FLOOR_FRACTION = 1e-3;
/** Default number of probe energies for matrices, log-spaced over the common range (Kiln's choice). */
export const DEFAULT_RMF_PROBES = 24;

export interface CompareOptions {
  tolerances?: Partial<CompareTolerances>;
  /** Probe energies (keV) for matrices; default log-spaced over the common range. */
  energiesKeV?: number[];
  /** Label of the pair for messages, e.g. "v1.1.0 → v1.2.0". */
  label?: string;
}

function overlap(aLo: Float64Array, aHi: Float64Array, bLo: Float64Array, bHi: Float64Array): [number, number] | null {
  const lo = Math.max(aLo[0], bLo[0]);
  const hi = Math.min(aHi[aHi.length - 1], bHi[bHi.length - 1]);
  return hi > lo ? [lo, hi] : null;
}

/** "review.arf.area-ratio": extremes of new/old area at the old grid's bin centres inside the common range. */
export function compareArf(older: ArfData, newer: ArfData, product: string | null, opts: CompareOptions = {}): Check[] {
  const tol = { ...DEFAULT_COMPARE_TOLERANCES, ...opts.tolerances };
  const label = opts.label ? `${opts.label}: ` : '';
  const range = overlap(older.energLoKeV, older.energHiKeV, newer.energLoKeV, newer.energHiKeV);
  const base = { id: 'review.arf.area-ratio', title: 'effective area ratio new/old', product, tolerance: `1 ± ${tol.areaRatio}`, unit: 'ratio' };
  if (!range) return [makeCheck('review', { ...base, message: `${label}the two ARFs share no energy range` })];
  let peak = 0;
  for (const v of older.specrespCm2) if (Number.isFinite(v) && v > peak) peak = v;
  let rMin = Infinity, rMax = -Infinity, eMin = NaN, eMax = NaN;
  for (let i = 0; i < older.specrespCm2.length; i++) {
    const e = 0.5 * (older.energLoKeV[i] + older.energHiKeV[i]);
    const a = older.specrespCm2[i];
    if (e < range[0] || e > range[1] || !(a > AREA_FLOOR_FRACTION * peak)) continue;
    const r = arfAt(newer, e) / a;
    if (r < rMin) [rMin, eMin] = [r, e];
    if (r > rMax) [rMax, eMax] = [r, e];
  }
  if (!Number.isFinite(rMin)) return [makeCheck('review', { ...base, message: `${label}no energy with usable area in both ARFs` })];
  const worst = Math.max(Math.abs(rMin - 1), Math.abs(rMax - 1));
  // One value when the extremes agree at the shown precision: no "from 1 at E to 1 at E".
  const flat = fmt(rMin) === fmt(rMax);
  return [
    makeCheck(worst > tol.areaRatio ? 'review' : 'pass', {
      ...base,
      measured: flat ? fmt(rMin) : `${fmt(rMin)}–${fmt(rMax)}`,
      message: flat
        ? `${label}area ratio ${fmt(rMin)} at every compared energy (${fmt(range[0])}–${fmt(range[1])} keV; allowed 1 ± ${tol.areaRatio})`
        : `${label}area ratio from ${fmt(rMin)} at ${fmt(eMin)} keV to ${fmt(rMax)} at ${fmt(eMax)} keV (allowed 1 ± ${tol.areaRatio})`,
    }),
  ];
}

function logSpaced(lo: number, hi: number, n: number): number[] {
  const a = log(lo), b = log(hi);
  return Array.from({ length: n }, (_, i) => exp(a + ((b - a) * (i + 0.5)) / n));
}

/**
 * Below the core means below centroid − LOW_SIGMAS σ of the older release's fitted core (Kiln's
 * choice: a Gaussian core leaves Φ(−2) = 2.3 % there, while a soft tail a few tens of eV long,
 * such as partial-charge events, already shows; 3σ would hide it under the core).
 */
const LOW_SIGMAS = 2;
const FWHM_PER_SIGMA = 2 * Math.sqrt(2 * Math.LN2);

/**
 * Share of row `i` in channels wholly below `edgeKeV`: what the low-energy tail, the shelf, the
 * escape and fluorescence lines and any partial-charge events put below the core.
 */
function shareBelow(rmf: RmfData, i: number, edgeKeV: number): number {
  const row = expandRow(rmf.rows[i], rmf.detchans, rmf.firstChannel);
  let s = 0;
  for (let k = 0; k < row.length; k++) if (rmf.ebounds.eMaxKeV[k] <= edgeKeV) s += row[k];
  return s;
}

function lowShareAt(rmf: RmfData, e: number, core: { centroidKeV: number; fwhmEv: number }): number {
  const edge = core.centroidKeV - (LOW_SIGMAS * core.fwhmEv) / FWHM_PER_SIGMA / EV_PER_KEV;
  const br = bracket(rmf.energLoKeV, rmf.energHiKeV, e);
  const s0 = shareBelow(rmf, br.i0, edge);
  return br.i1 === br.i0 || br.t === 0 ? s0 : s0 * (1 - br.t) + shareBelow(rmf, br.i1, edge) * br.t;
}

/**
 * Five checks: "review.rmf.channels" (same channel count and bounds), "review.rmf.centroid",
 * "review.rmf.fwhm" (fitted Gaussian core), "review.rmf.row-sum" and "review.rmf.low-share"
 * (the share of the row below the older core, where a changed soft tail shows), each reporting the
 * largest difference over the probe energies and where it occurs.
 */
export function compareRmf(older: RmfData, newer: RmfData, product: string | null, opts: CompareOptions = {}): Check[] {
  const tol = { ...DEFAULT_COMPARE_TOLERANCES, ...opts.tolerances };
  const label = opts.label ? `${opts.label}: ` : '';
  const out: Check[] = [];
  const sameChannels =
    older.detchans === newer.detchans &&
    older.firstChannel === newer.firstChannel &&
    older.ebounds.eMinKeV.every((v, i) => Math.abs(v - newer.ebounds.eMinKeV[i]) <= 1e-6 * Math.max(Math.abs(v), 1e-6));
  out.push(
    makeCheck(sameChannels ? 'pass' : 'review', {
      id: 'review.rmf.channels',
      title: 'same channels and channel bounds',
      product,
      measured: `${older.detchans} → ${newer.detchans}`,
      tolerance: 'equal',
      unit: 'channels',
      message: sameChannels ? `${label}channel grid unchanged` : `${label}channel grid changed (DETCHANS ${older.detchans} → ${newer.detchans}, or EBOUNDS differ): spectra binned for one do not fit the other`,
    }),
  );
  const range = overlap(older.energLoKeV, older.energHiKeV, newer.energLoKeV, newer.energHiKeV);
  if (!range) {
    out.push(makeCheck('review', { id: 'review.rmf.energy-range', title: 'common energy range', product, message: `${label}the matrices share no energy range` }));
    return out;
  }
  const energies = (opts.energiesKeV ?? logSpaced(Math.max(range[0], 1e-3), range[1], DEFAULT_RMF_PROBES)).filter((e) => e >= range[0] && e <= range[1]);
  const sumsA = rowSums(older);
  const sumsB = rowSums(newer);
  const worst = { centroid: { d: 0, e: NaN }, fwhm: { d: 0, e: NaN }, sum: { d: 0, e: NaN }, low: { d: 0, e: NaN, a: 0 } };
  let fitted = 0;
  for (const e of energies) {
    const sa = lerpAt(sumsA, bracket(older.energLoKeV, older.energHiKeV, e));
    const sb = lerpAt(sumsB, bracket(newer.energLoKeV, newer.energHiKeV, e));
    if (Math.abs(sb - sa) > Math.abs(worst.sum.d)) worst.sum = { d: sb - sa, e };
    const ca = fitCoreAt(older, e);
    const cb = fitCoreAt(newer, e);
    if (!ca || !cb) continue;
    fitted++;
    const dc = (cb.centroidKeV - ca.centroidKeV) * EV_PER_KEV;
    const df = cb.fwhmEv - ca.fwhmEv;
    if (Math.abs(dc) > Math.abs(worst.centroid.d)) worst.centroid = { d: dc, e };
    if (Math.abs(df) > Math.abs(worst.fwhm.d)) worst.fwhm = { d: df, e };
    // both rows cut at the older core, so a moved core does not count as a changed tail
    const la = lowShareAt(older, e, ca);
    const dl = lowShareAt(newer, e, ca) - la;
    if (Math.abs(dl) > Math.abs(worst.low.d)) worst.low = { d: dl, e, a: la };
  }
  const at = (w: { e: number }) => (Number.isFinite(w.e) ? ` at ${fmt(w.e)} keV` : '');
  const probes = plural(energies.length, 'probe energy', 'probe energies');
  const coreNote = fitted === 0 ? `no energy of ${probes} where both cores could be fitted` : fitted === energies.length ? `over ${probes}` : `over the ${fitted} of ${probes} where both cores could be fitted`;
  out.push(
    makeCheck(fitted === 0 || Math.abs(worst.centroid.d) > tol.centroidEv ? 'review' : 'pass', {
      id: 'review.rmf.centroid',
      title: 'largest change of the core centroid',
      product,
      measured: worst.centroid.d,
      tolerance: tol.centroidEv,
      unit: 'eV',
      message: `${label}largest centroid change ${fmt(worst.centroid.d)} eV${at(worst.centroid)} (${coreNote}; allowed ±${fmt(tol.centroidEv)} eV)`,
    }),
    makeCheck(fitted === 0 || Math.abs(worst.fwhm.d) > tol.fwhmEv ? 'review' : 'pass', {
      id: 'review.rmf.fwhm',
      title: 'largest change of the core FWHM',
      product,
      measured: worst.fwhm.d,
      tolerance: tol.fwhmEv,
      unit: 'eV',
      message: `${label}largest FWHM change ${fmt(worst.fwhm.d)} eV${at(worst.fwhm)} (${coreNote}; allowed ±${fmt(tol.fwhmEv)} eV)`,
    }),
    makeCheck(Math.abs(worst.sum.d) > tol.rowSum ? 'review' : 'pass', {
      id: 'review.rmf.row-sum',
      title: 'largest change of the row sum (redistribution efficiency)',
      product,
      measured: worst.sum.d,
      tolerance: tol.rowSum,
      message: `${label}largest row-sum change ${fmt(worst.sum.d)}${at(worst.sum)} (over ${probes}; allowed ±${fmt(tol.rowSum)})`,
    }),
    makeCheck(fitted > 0 && Math.abs(worst.low.d) > tol.lowShare ? 'review' : 'pass', {
      id: 'review.rmf.low-share',
      title: 'largest change of the share below the core (centroid − 2σ: soft tail, shelf, escape)',
      product,
      measured: worst.low.d,
      tolerance: tol.lowShare,
      message: `${label}largest change of the share below the core ${fmt(worst.low.d)}${Number.isFinite(worst.low.e) ? ` at ${fmt(worst.low.e)} keV (from ${fmt(worst.low.a)})` : ''} (${coreNote})`,
    }),
  );
  return out;
}
