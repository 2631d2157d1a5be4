/**
 * Partial-charge events of a partially collecting surface layer (one collection model for the ARF
 * and the RMF).
 *
 * A photon first interacting at depth z (density μ e^{−μz}, μ the total attenuation coefficient;
 * the photoabsorbed share μ_ph/μ is the same at every depth and cancels from the shares below)
 * gives an event carrying the fraction c(z) of its charge. In the layer 0 ≤ z < p the collection
 * rises linearly, c(z) = c0 + (1 − c0)·z/p; beyond it c = 1 (sensor model of detector.ts). Mapping
 * the depth distribution through c(z): the measured energy y = c·E of the layer's events is a
 * truncated exponential on [c0·E, E),
 *   density ∝ exp(−k (y − c0 E)),  k = μ p / ((1 − c0) E)  (per keV),
 * highest at the surface's c0·E and flat (a shelf) when μp ≪ 1; its share of all absorbed photons
 * is (1 − e^{−μp}) / (1 − e^{−μ(p+d)}). Whatever of it lies under the event threshold is lost: the
 * redistribution matrix applies the threshold to this component like any other.
 * Approach: partial-event models of X-ray CCD responses, in which the charge-collection
 * efficiency versus depth maps the absorption-depth distribution onto the low-energy tail
 * (e.g. Popp et al. 2000, NIM A 439, 567; citation and details from memory, not checked against
 * the paper). Kiln's linear c(z) is its own simplest choice of that profile.
 */

export interface PartialLayer {
  thicknessUm: number;
  collectionAtSurface: number;
}

export interface PartialChargeShape {
  /** Share of the absorbed photons that are absorbed in the partial layer. */
  fraction: number;
  /** Lower end c0·E of the measured-energy range, as a fraction of the full-charge energy. */
  lowShare: number;
  /** μ p / (1 − c0): the exponential's rate per unit of the collected fraction c (0 → flat). */
  rateAcrossLayer: number;
}

import { CM_PER_UM } from './layers.ts';
import { expm1 } from '../numeric/index.ts';

/**
 * The partial-charge component for a photon with attenuation coefficient muPerCm in a sensor with
 * the partial layer and the fully collecting depth depletionUm behind it.
 */
export function partialChargeShape(muPerCm: number, layer: PartialLayer, depletionUm: number): PartialChargeShape {
  const x = muPerCm * layer.thicknessUm * CM_PER_UM;
  const all = -expm1(-muPerCm * (layer.thicknessUm + depletionUm) * CM_PER_UM);
  const inLayer = -expm1(-x);
  const c0 = layer.collectionAtSurface;
  return {
    fraction: all > 0 ? inLayer / all : 0,
    lowShare: c0,
    rateAcrossLayer: c0 < 1 ? x / (1 - c0) : 0,
  };
}
