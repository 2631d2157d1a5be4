/**
 * Inputs of the redistribution model as the content tree states them. Each profile parameter
 * comes either from a law with coefficients, or from monotone interpolation of the measured
 * line fits in log energy ("line-fits").
 */

/** One measured line (a row of a release's line-fit CSV). Errors are 1σ. */
export interface LineFit {
  line: string;
  energyKeV: number;
  centroidKeV: number;
  centroidErrEv: number;
  fwhmEv: number;
  fwhmErrEv: number;
  /** Fraction of events in the low-energy exponential tail, and its e-folding scale. */
  tailFraction: number;
  tailFractionErr: number;
  tailScaleEv: number;
  /** Fraction of events in the flat shelf down to the lowest channel. */
  shelfFraction: number;
  /**
   * Measured detection efficiency: events in any channel above the threshold per photon incident
   * on the detector (no mirror), with its 1σ error; null where no absolute flux is known. The build
   * checks it against the stack's QE × the matrix row's detected fraction.
   */
  efficiency: number | null;
  efficiencyErr: number | null;
  /** Optional 1σ errors of the tail scale and the shelf fraction (absent: not judged by closure). */
  tailScaleErrEv?: number | null;
  shelfFractionErr?: number | null;
  /** Row band the line was measured in (absent: the whole detector). */
  region?: string;
}

/** FWHM law: σ² = (w·N_r)²·n_pix(E) + F·w·E + σ₀², n_pix(E) = a + b·E. */
export interface FwhmLaw {
  source: 'law';
  readNoiseE: number;
  fano: number;
  sigma0Ev: number;
  pixelsPerEvent: { a: number; bPerKeV: number };
}

/**
 * Energy scale: measured centroid(E) = E·(1 + gainError) + offsetEv − chargeLossEv·exp(−E/chargeLossScaleKeV).
 * The last term is the loss of charge near the entrance surface that shifts soft peaks low.
 */
export interface CentroidLaw {
  source: 'law';
  gainError: number;
  offsetEv: number;
  chargeLossEv: number;
  chargeLossScaleKeV: number;
}

/** Tail fraction(E) = f0·exp(−E/scaleKeV); tail e-folding scale constant. */
export interface TailLaw {
  source: 'law';
  fractionAtZero: number;
  fractionScaleKeV: number;
  tailScaleEv: number;
}

export interface ShelfLaw {
  source: 'law';
  fraction: number;
}

/**
 * Partial-charge events from the sensor's partially collecting layer (physics/partial-charge.ts)
 * instead of an empirical tail: the ARF then counts every absorbed photon and the matrix moves the
 * partial ones into this component or under the threshold. The line fits' tails test the model.
 */
export interface CollectionTail {
  source: 'collection';
}

export interface FromLineFits {
  source: 'line-fits';
}

export interface RedistributionSpec {
  /** Mean energy per electron-hole pair, eV. */
  pairEnergyEv: number;
  /** Events below this measured energy are lost (keV). */
  thresholdKeV: number;
  fwhm: FwhmLaw | (FromLineFits & { fano: number; readNoiseE: number; pixelsPerEvent: { a: number; bPerKeV: number }; sigma0Ev: number });
  centroid: CentroidLaw | FromLineFits;
  tail: TailLaw | FromLineFits | CollectionTail;
  shelf: ShelfLaw | FromLineFits;
  /** Include the Si Kα escape peak (fraction from the thick-slab approximation). */
  escape: boolean;
  /** Optional Si Kα fluorescence line from the detector's own surface layers: fraction above the Si K edge. */
  siFluorescenceFraction: number;
  /**
   * 'stack': the Si Kα line's share computed from the silicon-bearing layers in front of the sensor
   * (physics/stack-fluorescence.ts), replacing the constant siFluorescenceFraction (which must be 0).
   * Absent: the constant fraction above the Si K edge.
   */
  siFluorescenceSource?: 'stack';
  /** Charge lost in transfer; absent = none. Resolved models (the model document) always hold the law. */
  transferLoss?: TransferLossSpec;
}

/** f(E) = lossPerTransfer·(E/referenceKeV)^(−energyIndex) per transfer (physics/transfer-loss.ts). */
export type TransferLossSpec =
  | { source: 'law'; lossPerTransfer: number; energyIndex: number; referenceKeV: number }
  | { source: 'line-fits'; energyIndex?: number; referenceKeV: number };

/** The channel grid: PI channels of equal width in energy. */
export interface ChannelGrid {
  count: number;
  firstChannel: number;
  /** Width of one PI channel, eV; channel c spans [(c − firstChannel)·w, (c − firstChannel + 1)·w] + originEv. */
  widthEv: number;
  originEv: number;
}

/** The response energy grid (bins of true photon energy). */
export interface EnergyGridSpec {
  minKeV: number;
  maxKeV: number;
  bins: number;
  spacing: 'linear' | 'log';
}
