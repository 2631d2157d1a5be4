/**
 * Charge lost in transfer (CTI) and what it does to a line. Pure.
 *
 * - After N transfers with a fractional loss f per transfer a charge packet keeps Q₀(1 − f)^N
 *   (the definition of charge-transfer efficiency CTE = 1 − f: Janesick, "Scientific
 *   Charge-Coupled Devices", SPIE Press 2001, chapter on charge transfer; from memory), so the
 *   line centroid moves by E·[1 − (1 − f)^N] ≈ E·N·f.
 * - f falls with the packet size, modelled as a power of the energy, f(E) = f_ref·(E/E_ref)^(−α)
 *   (common practice, no source; α = 0 is a loss independent of energy).
 * - Width: each electron of the S = E/w in the packet is lost independently with probability
 *   p = 1 − (1 − f)^N, so the number lost is binomial, variance S·p(1 − p) electrons² (the
 *   binomial variance; Janesick's "transfer noise" for trapping and re-emission is of the same
 *   order, from memory). Across a band of transfer counts [N₁, N₂] the loss itself is spread
 *   almost uniformly between L(N₁) and L(N₂); a uniform distribution of width Δ has variance
 *   Δ²/12. Both add in quadrature to the line's σ².
 */
import { expm1, log1p, pow } from '../numeric/index.ts';
export interface TransferLossLaw {
  /** Fractional loss per transfer at referenceKeV. */
  lossPerTransfer: number;
  /** α in f(E) = f_ref·(E/E_ref)^(−α). */
  energyIndex: number;
  referenceKeV: number;
}

/** The transfers a region's charge makes: the band [first, last] of transfer counts. */
export interface TransferBand {
  firstTransfer: number;
  lastTransfer: number;
}

export const meanTransfers = (b: TransferBand): number => (b.firstTransfer + b.lastTransfer) / 2;

/** f(E), the fractional loss per transfer at energy E (keV). */
export function lossPerTransferAt(law: TransferLossLaw, energyKeV: number): number {
  return law.energyIndex === 0 ? law.lossPerTransfer : law.lossPerTransfer * pow(energyKeV / law.referenceKeV, -law.energyIndex);
}

/** Fraction of the charge lost after N transfers: 1 − (1 − f)^N. */
export function lostFraction(f: number, transfers: number): number {
  // −expm1(N·log1p(−f)) keeps precision when N·f is small.
  return -expm1(transfers * log1p(-f));
}

/** Centroid shift (keV, positive = lower) of a line of measured energy centroidKeV after N transfers. */
export function transferShiftKeV(law: TransferLossLaw, energyKeV: number, centroidKeV: number, transfers: number): number {
  return centroidKeV * lostFraction(lossPerTransferAt(law, energyKeV), transfers);
}

const EV_PER_KEV = 1000;

/**
 * Variance (keV²) the loss adds to a line of true energy E in a band: binomial loss of the S = E/w
 * electrons at the band's mean transfer count, plus the uniform spread of the loss across the band.
 */
export function transferVarianceKeV2(law: TransferLossLaw, energyKeV: number, centroidKeV: number, band: TransferBand, pairEnergyEv: number): number {
  const f = lossPerTransferAt(law, energyKeV);
  const p = lostFraction(f, meanTransfers(band));
  const wKeV = pairEnergyEv / EV_PER_KEV;
  const binomial = wKeV * centroidKeV * p * (1 - p);
  const spread = centroidKeV * (lostFraction(f, band.lastTransfer) - lostFraction(f, band.firstTransfer));
  return binomial + (spread * spread) / 12;
}
