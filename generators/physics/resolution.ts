/**
 * Energy resolution of a silicon pixel detector:
 *   σ_E² = (w·N_r)²·n_pix(E) + F·w·E + σ₀²,   FWHM = 2√(2 ln 2)·σ_E,
 * w the mean energy per electron-hole pair, N_r the read noise (e⁻ RMS per pixel), n_pix(E) the
 * number of pixels summed per event, F the Fano factor, σ₀ any constant term (e.g. transfer noise).
 * All energies in eV unless the name says keV.
 */
import { KilnInputError } from '../errors.ts';

/** FWHM of a Gaussian per unit σ: 2√(2 ln 2) ≈ 2.35482. */
export const FWHM_PER_SIGMA = 2 * Math.sqrt(2 * Math.LN2);

const EV_PER_KEV = 1000;

export interface ResolutionParams {
  pairEnergyEv: number;
  fano: number;
  readNoiseE: number;
  sigma0Ev: number;
  /** n_pix(E) = a + b·E (E in keV). */
  pixelsPerEvent: { a: number; bPerKeV: number };
}

/** Throws KilnInputError unless the parameters are physical. `where` prefixes the field names. */
export function checkResolutionParams(p: ResolutionParams, where = 'fwhm'): void {
  checkPairEnergy(p.pairEnergyEv);
  checkFano(p.fano, `${where}.fano`);
  if (!(p.readNoiseE >= 0) || !Number.isFinite(p.readNoiseE))
    throw new KilnInputError('read noise must be a finite number ≥ 0', { field: `${where}.readNoiseE`, value: p.readNoiseE, expected: '≥ 0 electrons RMS' });
  if (!(p.sigma0Ev >= 0) || !Number.isFinite(p.sigma0Ev))
    throw new KilnInputError('constant noise term must be ≥ 0', { field: `${where}.sigma0Ev`, value: p.sigma0Ev, expected: '≥ 0 eV' });
  const { a, bPerKeV } = p.pixelsPerEvent;
  if (!(a >= 1) || !Number.isFinite(a) || !Number.isFinite(bPerKeV) || !(bPerKeV >= 0))
    throw new KilnInputError('pixels per event must be a + b·E with a ≥ 1, b ≥ 0', {
      field: `${where}.pixelsPerEvent`,
      value: p.pixelsPerEvent,
      expected: 'a ≥ 1, bPerKeV ≥ 0',
    });
}

export function checkFano(fano: number, field = 'fano'): void {
  if (!(fano > 0 && fano < 1))
    throw new KilnInputError('Fano factor out of range', { field, value: fano, expected: 'a number in (0, 1)' });
}

export function checkPairEnergy(pairEnergyEv: number, field = 'pairEnergyEv'): void {
  if (!(pairEnergyEv > 0) || !Number.isFinite(pairEnergyEv))
    throw new KilnInputError('pair creation energy must be > 0', { field, value: pairEnergyEv, expected: '> 0 eV (≈3.65 for silicon)' });
}

/** Mean number of electron-hole pairs freed by a photon: E / w. */
export function electronsFreed(energyKeV: number, pairEnergyEv: number): number {
  return (energyKeV * EV_PER_KEV) / pairEnergyEv;
}

export function pixelsPerEventAt(energyKeV: number, p: ResolutionParams): number {
  return p.pixelsPerEvent.a + p.pixelsPerEvent.bPerKeV * energyKeV;
}

/** σ_E in eV at photon energy E. */
export function sigmaEv(energyKeV: number, p: ResolutionParams): number {
  const readEv = p.pairEnergyEv * p.readNoiseE;
  const v = readEv * readEv * pixelsPerEventAt(energyKeV, p) + p.fano * p.pairEnergyEv * energyKeV * EV_PER_KEV + p.sigma0Ev * p.sigma0Ev;
  return Math.sqrt(Math.max(v, 0));
}

export function fwhmEv(energyKeV: number, p: ResolutionParams): number {
  return FWHM_PER_SIGMA * sigmaEv(energyKeV, p);
}

/** Fano-limited σ (no read noise, no constant term): √(F·w·E), eV. */
export function fanoLimitSigmaEv(energyKeV: number, pairEnergyEv: number, fano: number): number {
  return Math.sqrt(fano * pairEnergyEv * energyKeV * EV_PER_KEV);
}

/** The minimum FWHM physically possible at E for given w and F (the Fano limit), eV. */
export function fanoLimitFwhmEv(energyKeV: number, pairEnergyEv: number, fano: number): number {
  return FWHM_PER_SIGMA * fanoLimitSigmaEv(energyKeV, pairEnergyEv, fano);
}

/**
 * Inverse of the law for the read noise: the N_r (e⁻ RMS per pixel) that gives `fwhmEv` at E for
 * the other parameters; NaN when the FWHM is below what F, w and σ₀ alone give.
 */
export function readNoiseForFwhmE(
  energyKeV: number,
  fwhmEvTarget: number,
  p: Omit<ResolutionParams, 'readNoiseE'>,
): number {
  const s = fwhmEvTarget / FWHM_PER_SIGMA;
  const rest = s * s - p.fano * p.pairEnergyEv * energyKeV * EV_PER_KEV - p.sigma0Ev * p.sigma0Ev;
  if (rest < 0) return NaN;
  const npix = p.pixelsPerEvent.a + p.pixelsPerEvent.bPerKeV * energyKeV;
  return Math.sqrt(rest / npix) / p.pairEnergyEv;
}

/**
 * Rejects measured widths narrower than the Fano limit (they would need a negative read noise).
 * Throws KilnInputError naming the line, its FWHM and the limit.
 */
export function checkAboveFanoLimit(
  lines: readonly { line: string; energyKeV: number; fwhmEv: number }[],
  pairEnergyEv: number,
  fano: number,
  file?: string,
): void {
  checkPairEnergy(pairEnergyEv);
  checkFano(fano);
  for (const l of lines) {
    const limit = fanoLimitFwhmEv(l.energyKeV, pairEnergyEv, fano);
    if (!(l.fwhmEv >= limit))
      throw new KilnInputError(`line ${l.line} at ${l.energyKeV} keV is narrower than the Fano limit`, {
        file,
        field: `${l.line}.fwhmEv`,
        value: l.fwhmEv,
        expected: `≥ ${limit.toFixed(1)} eV (Fano limit for w = ${pairEnergyEv} eV, F = ${fano})`,
      });
  }
}
