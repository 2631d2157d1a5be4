/**
 * Refit of the Gaussian core of one RMF row: the part of the profile near its peak, where tails,
 * shelf and escape peak contribute little. Method: weighted least squares of ln(y) against a
 * parabola in channel energy (a Gaussian is a parabola in log space; weights y² undo the log's
 * stretching of small values — Caruana's algorithm with Guo's weighting, H. Guo, IEEE Signal
 * Processing Magazine 28(5), 2011, from memory). Channel contents are integrals over each channel,
 * which widen the apparent variance by Δ²/12 (Sheppard's correction, common practice); we remove it.
 */
import { FWHM_PER_SIGMA } from '../physics/resolution.ts';
import type { RmfData } from '../response/types.ts';
import { bracket, denseRow } from './interpolate.ts';
import { log } from '../numeric/index.ts';

/** FWHM = 2·sqrt(2 ln 2)·σ for a Gaussian (one definition, in physics/resolution.ts). */
export { FWHM_PER_SIGMA };
/**
 * Channels whose density is at least this fraction of the peak form the core: ±1.8σ of a Gaussian,
 * enough points for the fit and little of a low-energy tail (Kiln's choice, no source).
 */
export const CORE_FRACTION = 0.2;
const EV_PER_KEV = 1000;

export interface GaussianCore {
  centroidKeV: number;
  fwhmEv: number;
  /** Channel number of the highest density. */
  peakChannel: number;
  /** Channels used in the fit. */
  points: number;
}

export interface CoreFitOptions {
  /**
   * "both": channels on both sides of the peak down to CORE_FRACTION. "upper": the peak and
   * the channels above it — the side away from the low-energy tail and
   * shelf, which otherwise pull a soft line's core low and wide (Kiln's choice).
   */
  side?: 'both' | 'upper';
}

/** Fits the core of row `i`. Returns null when the row has fewer than 3 usable channels near its peak. */
export function fitRowCore(rmf: RmfData, i: number, opts: CoreFitOptions = {}): GaussianCore | null {
  const y = denseRow(rmf, i);
  const { eMinKeV, eMaxKeV } = rmf.ebounds;
  const n = Math.min(y.length, eMinKeV.length);
  const dens = new Float64Array(n);
  let kMax = -1;
  for (let k = 0; k < n; k++) {
    const w = eMaxKeV[k] - eMinKeV[k];
    dens[k] = w > 0 && Number.isFinite(y[k]) ? y[k] / w : 0;
    if (kMax < 0 || dens[k] > dens[kMax]) kMax = k;
  }
  if (kMax < 0 || !(dens[kMax] > 0)) return null;
  const floor = CORE_FRACTION * dens[kMax];
  let a = kMax;
  let b = kMax;
  while (a > 0 && dens[a - 1] >= floor) a--;
  while (b < n - 1 && dens[b + 1] >= floor) b++;
  if (opts.side === 'upper') a = Math.max(a, kMax);
  if (b - a + 1 < 3) return null;
  // Centre x on the peak for conditioning.
  const x0 = 0.5 * (eMinKeV[kMax] + eMaxKeV[kMax]);
  let s0 = 0, s1 = 0, s2 = 0, s3 = 0, s4 = 0, t0 = 0, t1 = 0, t2 = 0;
  let widthSum = 0;
  for (let k = a; k <= b; k++) {
    const x = 0.5 * (eMinKeV[k] + eMaxKeV[k]) - x0;
    const w = dens[k] * dens[k];
    const ly = log(dens[k]);
    s0 += w; s1 += w * x; s2 += w * x * x; s3 += w * x * x * x; s4 += w * x * x * (x * x);
    t0 += w * ly; t1 += w * x * ly; t2 += w * x * x * ly;
    widthSum += eMaxKeV[k] - eMinKeV[k];
  }
  const sol = solve3([s0, s1, s2], [s1, s2, s3], [s2, s3, s4], [t0, t1, t2]);
  if (!sol) return null;
  const [, c1, c2] = sol;
  if (!(c2 < 0)) return null;
  const varianceKeV2 = -1 / (2 * c2);
  const meanWidth = widthSum / (b - a + 1);
  const corrected = varianceKeV2 - (meanWidth * meanWidth) / 12;
  if (!(corrected > 0)) return null;
  return {
    centroidKeV: x0 - c1 / (2 * c2),
    fwhmEv: FWHM_PER_SIGMA * Math.sqrt(corrected) * EV_PER_KEV,
    peakChannel: kMax + rmf.ebounds.firstChannel,
    points: b - a + 1,
  };
}

/** Core at an arbitrary energy: fits of the two bracketing rows, interpolated linearly. */
export function fitCoreAt(rmf: RmfData, energyKeV: number, opts: CoreFitOptions = {}): GaussianCore | null {
  const br = bracket(rmf.energLoKeV, rmf.energHiKeV, energyKeV);
  const f0 = fitRowCore(rmf, br.i0, opts);
  if (br.i1 === br.i0 || br.t === 0) return f0;
  const f1 = fitRowCore(rmf, br.i1, opts);
  if (!f0 || !f1) return null;
  const t = br.t;
  return {
    centroidKeV: f0.centroidKeV * (1 - t) + f1.centroidKeV * t,
    fwhmEv: f0.fwhmEv * (1 - t) + f1.fwhmEv * t,
    peakChannel: t < 0.5 ? f0.peakChannel : f1.peakChannel,
    points: Math.min(f0.points, f1.points),
  };
}

/** Cramer's rule for a symmetric 3×3 system given by rows. */
function solve3(r0: number[], r1: number[], r2: number[], rhs: number[]): [number, number, number] | null {
  const det = (m: number[][]) =>
    m[0][0] * (m[1][1] * m[2][2] - m[1][2] * m[2][1]) -
    m[0][1] * (m[1][0] * m[2][2] - m[1][2] * m[2][0]) +
    m[0][2] * (m[1][0] * m[2][1] - m[1][1] * m[2][0]);
  const m = [r0, r1, r2];
  const d = det(m);
  if (!Number.isFinite(d) || d === 0) return null;
  const col = (j: number) => m.map((row, i) => row.map((v, k) => (k === j ? rhs[i] : v)));
  return [det(col(0)) / d, det(col(1)) / d, det(col(2)) / d];
}
