/**
 * Refit of a whole matrix row with the profile family the line fits use: Gaussian core, low-energy
 * exponential tail (exponentially modified Gaussian) and flat shelf down to the lowest channel,
 * integrated over each channel (physics/profile.ts CDFs). Weighted least squares as for a line
 * measured with REFIT_COUNTS events (σ_k = √counts), on the channels above the threshold, with the
 * Si escape peak and the Si Kα fluorescence line masked (±MASK_SIGMAS σ). The fractions are given
 * as shares of all events at that energy (the fitted normalisation folds in escape and
 * fluorescence, as the profile model does). Whatever the matrix was made from (laws, an
 * interpolation, the partial-charge model), the refit says what a line fit would measure on it.
 */
import { weightedLeastSquares } from '../fit/lsq.ts';
import { componentCdf, type ProfileComponent } from '../physics/profile.ts';
import type { RmfData } from '../response/types.ts';
import { fitCoreAt } from './gaussian-core.ts';
import { bracket, denseRow } from './interpolate.ts';

/** Events of the notional line whose counting noise weights the refit (Kiln's choice: far more than any line fit has). */
export const REFIT_COUNTS = 1e6;
/** Half-width of the masks around the escape peak and the fluorescence line, in σ. */
export const MASK_SIGMAS = 5;
/** Channels used above the peak, in σ. */
const ABOVE_SIGMAS = 6;
const EV_PER_KEV = 1000;

export interface ProfileRefit {
  centroidKeV: number;
  sigmaKeV: number;
  tailFraction: number;
  tailScaleEv: number;
  shelfFraction: number;
  /** Channels used. */
  points: number;
}

export interface RefitContext {
  thresholdKeV: number;
  /** Si Kα energy and K edge (masks); omit when the matrix has neither escape nor fluorescence. */
  siKAlphaKeV?: number;
  siKEdgeKeV?: number;
  /** Starting values (usually the line fit's). */
  start: { tailFraction: number; tailScaleEv: number; shelfFraction: number };
}

export function refitProfileAt(rmf: RmfData, energyKeV: number, ctx: RefitContext): ProfileRefit | null {
  const core = fitCoreAt(rmf, energyKeV, { side: 'upper' });
  if (!core) return null;
  const br = bracket(rmf.energLoKeV, rmf.energHiKeV, energyKeV);
  const i = br.t < 0.5 ? br.i0 : br.i1;
  const row = denseRow(rmf, i);
  const { eMinKeV, eMaxKeV } = rmf.ebounds;
  const c0 = core.centroidKeV;
  const s0 = core.fwhmEv / 2.3548200450309493 / EV_PER_KEV;
  const lowest = eMinKeV[0];
  const masks: [number, number][] = [];
  if (ctx.siKAlphaKeV !== undefined) {
    const w = MASK_SIGMAS * s0;
    masks.push([ctx.siKAlphaKeV - w, ctx.siKAlphaKeV + w]);
    if (ctx.siKEdgeKeV !== undefined && energyKeV > ctx.siKEdgeKeV) masks.push([energyKeV - ctx.siKAlphaKeV - w, energyKeV - ctx.siKAlphaKeV + w]);
  }
  const use: number[] = [];
  for (let k = 0; k < row.length && k < eMinKeV.length; k++) {
    if (eMinKeV[k] < ctx.thresholdKeV || eMaxKeV[k] > c0 + ABOVE_SIGMAS * s0) continue;
    const mid = 0.5 * (eMinKeV[k] + eMaxKeV[k]);
    if (masks.some(([a, b]) => mid > a && mid < b)) continue;
    use.push(k);
  }
  if (use.length < 8) return null;
  const y = use.map((k) => row[k]);
  const sigma = y.map((v) => Math.sqrt(Math.max(v, 1 / REFIT_COUNTS) / REFIT_COUNTS));

  // θ = [centroid keV, σ keV, tail share, tail scale keV, shelf share, normalisation]
  const cache = new Map<string, Float64Array>();
  const channelProbs = (t: readonly number[]): Float64Array => {
    const key = t.join(',');
    const hit = cache.get(key);
    if (hit) return hit;
    const [c, s, ft, tau, fs, norm] = t;
    const comps: ProfileComponent[] = [
      { kind: 'peak', fraction: 1 - fs, centroidKeV: c, sigmaKeV: s, scaleKeV: tau, tailShare: (1 - fs) > 0 ? ft / (1 - fs) : 0 },
      { kind: 'shelf', fraction: fs, lowKeV: Math.min(lowest, c), highKeV: c, sigmaKeV: s },
    ];
    const cdfs = comps.map((cp) => ({ f: cp.fraction, F: componentCdf(cp) }));
    const F = (x: number) => cdfs.reduce((acc, q) => acc + q.f * q.F(x), 0);
    const out = new Float64Array(use.length);
    use.forEach((k, j) => (out[j] = norm * (F(eMaxKeV[k]) - F(eMinKeV[k]))));
    if (cache.size > 64) cache.clear();
    cache.set(key, out);
    return out;
  };
  const index = use.map((_, j) => j);
  const st = ctx.start;
  try {
    const fit = weightedLeastSquares({
      names: ['centroid', 'sigma', 'tail', 'tailScale', 'shelf', 'norm'],
      x: index,
      y,
      sigma,
      model: (t, j) => channelProbs(t)[j],
      initial: [c0, s0, Math.min(Math.max(st.tailFraction, 1e-4), 0.8), Math.max(st.tailScaleEv, 5) / EV_PER_KEV, Math.min(Math.max(st.shelfFraction, 1e-4), 0.4), 1],
      min: [c0 - 5 * s0, 0.2 * s0, 0, 1e-3, 0, 0.2],
      max: [c0 + 5 * s0, 5 * s0, 0.95, 2, 0.5, 1.5],
      scale: [s0, s0, 0.01, 0.02, 0.005, 1],
      label: `profile refit at ${energyKeV} keV`,
    });
    const p = fit.params;
    return {
      centroidKeV: p.centroid,
      sigmaKeV: p.sigma,
      tailFraction: p.tail * p.norm,
      tailScaleEv: p.tailScale * EV_PER_KEV,
      shelfFraction: p.shelf * p.norm,
      points: use.length,
    };
  } catch {
    return null;
  }
}
