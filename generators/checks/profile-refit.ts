/**
 * Refit of a whole matrix row with the profile family the line fits use: Gaussian core, low-energy
 * exponential tail (exponentially modified Gaussian) and flat shelf down to the lowest channel,
 * integrated over each channel (physics/profile.ts CDFs). Centroid and σ come from the core refit
 * (gaussian-core.ts); the three masses by weighted linear least squares as for a line measured with
 * REFIT_COUNTS events (σ_k = √counts), centroid, σ and tail scale by Levenberg–Marquardt; channels above the threshold,
 * the Si escape peak and the Si Kα fluorescence line masked (±MASK_SIGMAS σ). A row is per photon,
 * so the masses are shares of all events at that energy, as the line fits' fractions are. Whatever the matrix was made from (laws, an
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
  const w = y.map((v) => REFIT_COUNTS / Math.max(v, 1 / REFIT_COUNTS));
  const lo = use.map((k) => eMinKeV[k]);
  const hi = use.map((k) => eMaxKeV[k]);
  const channelMass = (cp: ProfileComponent) => {
    const F = componentCdf(cp);
    return lo.map((a, j) => F(hi[j]) - F(a));
  };
  // Variable projection: for a centroid, σ and tail scale τ the row is linear in the three masses
  // (core, tail, shelf), solved by weighted least squares with masses ≥ 0; Levenberg–Marquardt
  // (fit/lsq.ts) moves the three non-linear parameters, starting from the core refit and the line fit.
  const solve = (c: number, sg: number, tauKeV: number) => {
    const basis = [
      channelMass({ kind: 'gaussian', role: 'core', fraction: 1, centroidKeV: c, sigmaKeV: sg }),
      channelMass({ kind: 'tail', fraction: 1, centroidKeV: c, sigmaKeV: sg, scaleKeV: tauKeV }),
      channelMass({ kind: 'shelf', fraction: 1, lowKeV: Math.min(lowest, c), highKeV: c, sigmaKeV: sg }),
    ];
    const masses = nonNegativeLsq(basis, y, w);
    const fitted = y.map((_, j) => masses[0] * basis[0][j] + masses[1] * basis[1][j] + masses[2] * basis[2][j]);
    return { masses, fitted };
  };
  const cache = new Map<string, ReturnType<typeof solve>>();
  const at = (t: readonly number[]) => {
    const key = t.join(',');
    let hit = cache.get(key);
    if (!hit) {
      if (cache.size > 64) cache.clear();
      hit = solve(t[0], t[1], t[2]);
      cache.set(key, hit);
    }
    return hit;
  };
  const tauMin = Math.max(TAU_MIN_KEV, 0.5 * s0);
  const tau0 = Math.min(Math.max(ctx.start.tailScaleEv / EV_PER_KEV, tauMin), TAU_MAX_KEV);
  let theta: readonly number[] = [c0, s0, tau0];
  try {
    const fit = weightedLeastSquares({
      names: ['centroid', 'sigma', 'tailScale'],
      x: y.map((_, j) => j),
      y,
      sigma: w.map((v) => 1 / Math.sqrt(v)),
      model: (t, j) => at(t).fitted[j],
      initial: theta,
      min: [c0 - 3 * s0, 0.5 * s0, tauMin],
      max: [c0 + 3 * s0, 2 * s0, TAU_MAX_KEV],
      scale: [0.1 * s0, 0.1 * s0, 0.2 * tau0],
      label: `profile refit at ${energyKeV} keV`,
    });
    theta = [fit.params.centroid, fit.params.sigma, fit.params.tailScale];
  } catch {
    return null;
  }
  const { masses } = at(theta);
  return {
    centroidKeV: theta[0],
    sigmaKeV: theta[1],
    tailFraction: masses[1],
    tailScaleEv: theta[2] * EV_PER_KEV,
    shelfFraction: masses[2],
    points: use.length,
  };
}

/** Tail scales allowed, keV (3 eV to 2 keV: any tail a CCD line fit reports; at least σ/2, below which a tail is a second core). */
const TAU_MIN_KEV = 0.003;
const TAU_MAX_KEV = 2;

/** Weighted least squares y ≈ Σ m_i·basis_i with m_i ≥ 0 (active set over at most three bases). */
function nonNegativeLsq(basis: number[][], y: number[], w: number[]): number[] {
  const n = basis.length;
  let active = [...Array(n).keys()];
  for (let round = 0; round <= n; round++) {
    const k = active.length;
    const A = Array.from({ length: k }, () => new Array<number>(k).fill(0));
    const r = new Array<number>(k).fill(0);
    for (let j = 0; j < y.length; j++)
      for (let p = 0; p < k; p++) {
        const bp = basis[active[p]][j] * w[j];
        r[p] += bp * y[j];
        for (let q = 0; q < k; q++) A[p][q] += bp * basis[active[q]][j];
      }
    const m = solveSmall(A, r);
    const out = new Array<number>(n).fill(0);
    if (m && m.every((v) => v >= 0)) {
      active.forEach((i, p) => (out[i] = m[p]));
      return out;
    }
    // drop the most negative (or, when singular, the last) basis and solve again
    const drop = m ? active[m.indexOf(Math.min(...m))] : active[active.length - 1];
    active = active.filter((i) => i !== drop);
    if (active.length === 0) return out;
  }
  return new Array<number>(n).fill(0);
}

/** Gaussian elimination with partial pivoting for k ≤ 3; null when singular. */
function solveSmall(A: number[][], b: number[]): number[] | null {
  const k = b.length;
  const M = A.map((row, i) => [...row, b[i]]);
  for (let c = 0; c < k; c++) {
    let piv = c;
    for (let r = c + 1; r < k; r++) if (Math.abs(M[r][c]) > Math.abs(M[piv][c])) piv = r;
    if (!(Math.abs(M[piv][c]) > 1e-300)) return null;
    [M[c], M[piv]] = [M[piv], M[c]];
    for (let r = 0; r < k; r++) {
      if (r === c) continue;
      const f = M[r][c] / M[c][c];
      for (let q = c; q <= k; q++) M[r][q] -= f * M[c][q];
    }
  }
  return M.map((row, i) => row[k] / row[i]);
}
