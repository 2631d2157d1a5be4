/**
 * Fit of the FWHM law FWHM(E) = 2√(2 ln 2)·√((w·N_r)²·n_pix(E) + F·w·E + σ₀²) to measured line
 * widths, with w fixed and n_pix(E) given. Lines narrower than the Fano limit are rejected first.
 * Note: with n_pix constant, N_r and σ₀ enter only as (w N_r)² n_pix + σ₀² and cannot be separated,
 * so σ₀ is held fixed unless asked for.
 */
import type { FwhmLaw, LineFit } from '../response/model-types.ts';
import { checkAboveFanoLimit, checkPairEnergy, FWHM_PER_SIGMA } from '../physics/resolution.ts';
import { weightedLeastSquares, type FitResult } from './lsq.ts';

export const FWHM_LAW_PARAMS = ['readNoiseE', 'fano', 'sigma0Ev'] as const;
export type FwhmLawParam = (typeof FWHM_LAW_PARAMS)[number];

/** Fano factor of silicon used as starting value and for the limit check unless stated (≈0.115–0.12, common practice). */
export const DEFAULT_SILICON_FANO = 0.115;

export interface FwhmFitOptions {
  pairEnergyEv: number;
  pixelsPerEvent: { a: number; bPerKeV: number };
  /** Starting values; parameters not in `free` are held at these. */
  initial?: Partial<Record<FwhmLawParam, number>>;
  /** Parameters to fit; default readNoiseE and fano. */
  free?: readonly FwhmLawParam[];
  /** F used for the Fano-limit rejection; default initial.fano. */
  fanoForLimit?: number;
  scaleByReducedChi2?: boolean;
  file?: string;
}

export function fwhmModelEv(theta: readonly number[], energyKeV: number, w: number, ppe: { a: number; bPerKeV: number }): number {
  const [nr, fano, s0] = theta;
  const npix = ppe.a + ppe.bPerKeV * energyKeV;
  return FWHM_PER_SIGMA * Math.sqrt(w * nr * (w * nr) * npix + fano * w * energyKeV * 1000 + s0 * s0);
}

export function fitFwhmLaw(lines: readonly LineFit[], o: FwhmFitOptions): FitResult {
  checkPairEnergy(o.pairEnergyEv);
  const init = { readNoiseE: 3, fano: DEFAULT_SILICON_FANO, sigma0Ev: 0, ...o.initial };
  checkAboveFanoLimit(lines, o.pairEnergyEv, o.fanoForLimit ?? init.fano, o.file);
  const free = new Set(o.free ?? ['readNoiseE', 'fano']);
  const w = o.pairEnergyEv;
  const ppe = o.pixelsPerEvent;
  return weightedLeastSquares({
    label: 'FWHM law',
    file: o.file,
    names: FWHM_LAW_PARAMS,
    x: lines.map((l) => l.energyKeV),
    y: lines.map((l) => l.fwhmEv),
    sigma: lines.map((l) => l.fwhmErrEv),
    initial: FWHM_LAW_PARAMS.map((k) => init[k]),
    fixed: FWHM_LAW_PARAMS.map((k) => !free.has(k)),
    min: [0, 1e-6, 0],
    max: [1e4, 1 - 1e-6, 1e4],
    scale: [Math.max(init.readNoiseE, 1), Math.max(init.fano, 0.01), Math.max(init.sigma0Ev, 1)],
    scaleByReducedChi2: o.scaleByReducedChi2,
    model: (t, e) => fwhmModelEv(t, e, w, ppe),
    jacobian: (t, e) => {
      const [nr, fano, s0] = t;
      const npix = ppe.a + ppe.bPerKeV * e;
      const sigma = Math.sqrt(w * nr * (w * nr) * npix + fano * w * e * 1000 + s0 * s0);
      const k = FWHM_PER_SIGMA / sigma;
      return [k * w * w * nr * npix, (k * w * e * 1000) / 2, k * s0];
    },
  });
}

/** The fitted law in the content tree's shape. */
export function toFwhmLaw(r: FitResult, pixelsPerEvent: { a: number; bPerKeV: number }): FwhmLaw {
  return { source: 'law', readNoiseE: r.params.readNoiseE, fano: r.params.fano, sigma0Ev: r.params.sigma0Ev, pixelsPerEvent };
}
