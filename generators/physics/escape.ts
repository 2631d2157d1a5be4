/**
 * Si Kα escape fraction for photons entering a thick silicon slab at normal incidence.
 *
 * Thick-slab approximation (S. J. B. Reed and N. G. Ware, "Escape peaks and internal fluorescence
 * in X-ray spectra recorded with lithium drifted silicon detectors", J. Phys. E 5 (1972) 582 —
 * citation from memory): a photon absorbed at depth z by a K-shell photoionisation (probability
 * 1 − 1/J of the absorptions above the edge) emits Kα with yield ω_K isotropically; half go
 * backwards, and integrating escape through the front face over depth and angle gives
 *   η(E) = ½ ω_K (1 − 1/J) [1 − (μ_f/μ_E) ln(1 + μ_E/μ_f)],
 * with μ_E, μ_f the attenuation coefficients at E and at the Kα energy. Kβ (a few per cent of the
 * K emission in silicon) is counted as Kα; the slab is assumed thick compared with 1/μ_f.
 * Pure: the caller supplies the atomic data, so this file depends on no table.
 */
import { KilnInputError } from '../errors.ts';
import { log1p } from '../numeric/index.ts';

export interface EscapeInputs {
  /** K-shell fluorescence yield ω_K of silicon. */
  fluorescenceYield: number;
  /** K-edge jump ratio J (ratio of photoabsorption just above to just below the edge). */
  jumpRatio: number;
  kEdgeKeV: number;
  kAlphaKeV: number;
  /** Attenuation coefficient (any consistent unit, e.g. cm²/g) versus energy in keV. */
  attenuation: (energyKeV: number) => number;
}

export function checkEscapeInputs(s: EscapeInputs, field = 'silicon'): void {
  const bad = (name: string, value: unknown, expected: string) => {
    throw new KilnInputError('bad silicon atomic data', { field: `${field}.${name}`, value, expected });
  };
  if (!(s.fluorescenceYield > 0 && s.fluorescenceYield < 1)) bad('fluorescenceYield', s.fluorescenceYield, 'in (0, 1)');
  if (!(s.jumpRatio > 1) || !Number.isFinite(s.jumpRatio)) bad('jumpRatio', s.jumpRatio, '> 1');
  if (!(s.kAlphaKeV > 0 && s.kEdgeKeV > s.kAlphaKeV)) bad('kAlphaKeV', s.kAlphaKeV, '0 < Kα < K edge');
}

/** η(E) from the coefficients directly (0 ≤ η < ½ ω_K (1 − 1/J)). */
export function escapeFractionFromMu(fluorescenceYield: number, jumpRatio: number, muAtEnergy: number, muAtKAlpha: number): number {
  const r = muAtEnergy / muAtKAlpha;
  // 1 − ln(1 + r)/r; for small r use its series r/2 − r²/3 + r³/4 to avoid cancellation
  const bracket = r < 1e-4 ? r / 2 - (r * r) / 3 + (r * r * r) / 4 : 1 - log1p(r) / r;
  return 0.5 * fluorescenceYield * (1 - 1 / jumpRatio) * bracket;
}

/** η(E): zero at and below the Si K edge, the thick-slab value above it. */
export function escapeFraction(energyKeV: number, s: EscapeInputs): number {
  if (energyKeV <= s.kEdgeKeV) return 0;
  return escapeFractionFromMu(s.fluorescenceYield, s.jumpRatio, s.attenuation(energyKeV), s.attenuation(s.kAlphaKeV));
}

/** A memoising η(E) for repeated use (μ at Kα evaluated once). */
export function escapeFractionFn(s: EscapeInputs): (energyKeV: number) => number {
  checkEscapeInputs(s);
  const muF = s.attenuation(s.kAlphaKeV);
  return (e) => (e <= s.kEdgeKeV ? 0 : escapeFractionFromMu(s.fluorescenceYield, s.jumpRatio, s.attenuation(e), muF));
}
