/**
 * Pile-up estimate from Poisson statistics of one event cell: with λ expected photons per frame in
 * the brightest cell, a frame holds two or more with P(≥2) = 1 − e^{−λ}(1 + λ); the share of
 * non-empty frames that are piled is P(≥2)/(1 − e^{−λ}); a photon in that cell shares its frame
 * with another with probability 1 − e^{−λ}. Only the brightest cell is considered (an upper bound
 * for the image); grade migration, energy pile-up's spectral distortion, the point-spread
 * function's shape and the dead time of the readout are left out. A fuller model: Davis (2001,
 * ApJ 562, 575).
 */
import { exp, expm1 } from '../numeric/index.ts';
export interface PileupInputs {
  /** Folded count rate of the source, counts/s. */
  rateCps: number;
  frameTimeS: number;
  /** Fraction of the point-source image in the brightest event cell (0–1]. */
  brightestCellFraction: number;
}

export interface PileupEstimate extends PileupInputs {
  /** Expected photons per frame in the brightest cell. */
  photonsPerFrame: number;
  /** P(≥ 2 photons in the cell in one frame). */
  pileupProbability: number;
  /** Share of non-empty frames (of that cell) holding two or more photons. */
  piledFrameFraction: number;
  /** Share of the cell's photons that arrive with at least one other in their frame. */
  affectedEventFraction: number;
}

export const PILEUP_LEAVES_OUT =
  'Estimated from the brightest event cell alone (an upper bound for the image as a whole) with Poisson arrivals; it leaves out grade migration, the spectral distortion of piled events, the shape of the point-spread function beyond that cell, and readout dead time.';

export function pileupEstimate(x: PileupInputs): PileupEstimate {
  const lambda = x.rateCps * x.frameTimeS * x.brightestCellFraction;
  // −expm1 keeps precision for faint sources, where 1 − e^{−λ} ≈ λ.
  const nonEmpty = -expm1(-lambda);
  const piled = lambda < 1e-4 ? (lambda * lambda) / 2 - (lambda * lambda * lambda) / 3 : nonEmpty - lambda * exp(-lambda);
  return {
    ...x,
    photonsPerFrame: lambda,
    pileupProbability: piled,
    piledFrameFraction: nonEmpty > 0 ? piled / nonEmpty : 0,
    affectedEventFraction: nonEmpty,
  };
}
