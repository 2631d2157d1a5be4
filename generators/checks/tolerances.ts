/**
 * Named tolerances of the checks, each with where it comes from. Callers may override the
 * closure and cross-release ones; the structural and numeric ones are fixed so that `kiln check`
 * means the same thing everywhere.
 */

/**
 * A row of a redistribution matrix sums to at most 1 (a photon is detected at most once).
 * Matrix elements are stored as 32-bit floats (TFORM E), whose relative precision is 2^-24 ≈ 6e-8;
 * summing a few thousand elements accumulates ~1e-5 at worst (common practice, no source).
 */
export const ROW_SUM_MAX_EXCESS = 1e-5;

/**
 * Adjacent energy bins must touch: |ENERG_HI[i] − ENERG_LO[i+1]| ≤ this relative amount.
 * Grids are written as 32-bit floats by many tools (relative precision ~6e-8); allow 1e-6
 * (common practice, no source).
 */
export const GRID_CONTIGUITY_REL = 1e-6;

/** Relative tolerance when comparing the ARF energy grid with the RMF's (same reason as above). */
export const GRID_MATCH_REL = 1e-6;

/** Closure: fitted RMF core vs line fit. Defaults; the build may pass its own. */
export interface ClosureTolerances {
  /** Allowed |Δcentroid| in units of the line fit's 1σ centroid error, and a floor in eV. */
  centroidSigma: number;
  centroidFloorEv: number;
  /** Allowed |ΔFWHM| in units of the line fit's 1σ FWHM error, and a floor in eV. */
  fwhmSigma: number;
  fwhmFloorEv: number;
  /** Allowed |Δefficiency| in units of the measurement's 1σ error, and an absolute floor. */
  efficiencySigma: number;
  efficiencyFloor: number;
}

/**
 * 3σ is the conventional bound for "consistent with the measurement" (common practice, no source);
 * the floors cover the channel width: a Gaussian refit on channels a few eV wide cannot do better
 * than ~1 eV (common practice, no source).
 */
export const DEFAULT_CLOSURE_TOLERANCES: ClosureTolerances = {
  centroidSigma: 3,
  centroidFloorEv: 1,
  fwhmSigma: 3,
  fwhmFloorEv: 2,
  efficiencySigma: 3,
  efficiencyFloor: 0.005,
};

/** Cross-release: differences beyond these are flagged for a reviewer (status 'review'). */
export interface CompareTolerances {
  /** Allowed |ARF ratio − 1|. */
  areaRatio: number;
  /** Allowed |ΔFWHM| (eV) of the fitted Gaussian core. */
  fwhmEv: number;
  /** Allowed |Δcentroid| (eV) of the fitted Gaussian core. */
  centroidEv: number;
  /** Allowed |Δ row sum| (absolute, probability). */
  rowSum: number;
  /** Allowed |Δ share of the row below the core| (absolute, probability): the soft tail and shelf. */
  lowShare: number;
}

/**
 * Defaults (Kiln's own choice, no source): 2 % in area and a few eV in the core are below what
 * observers notice in typical CCD spectra; anything larger deserves a human look.
 */
export const DEFAULT_COMPARE_TOLERANCES: CompareTolerances = {
  areaRatio: 0.02,
  fwhmEv: 3,
  centroidEv: 2,
  rowSum: 0.01,
  lowShare: 0.01,
};
