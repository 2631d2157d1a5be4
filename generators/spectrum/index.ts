/**
 * The spectral engine (browser-safe): source components and cold-gas absorption, bin-integrated
 * folding through an RMF and ARF, seeded Poisson spectra, the C-statistic, forward-folding fits
 * with profile errors, pile-up estimates and the impact of a change of response.
 */
export * from './data/abundances.ts';
export * from './absorption.ts';
export * from './components.ts';
export * from './model.ts';
export * from './response.ts';
export * from './flux.ts';
export * from './fold.ts';
export * from './random.ts';
export * from './cstat.ts';
export * from './fit.ts';
export * from './pileup.ts';
export * from './simulate.ts';
export * from './impact.ts';
export * from './pairing.ts';
