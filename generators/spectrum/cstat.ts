/**
 * The C-statistic of Cash (1979, ApJ 228, 939) in the form C = 2 Σ (m − d + d ln(d/m)), the
 * d ln(d/m) term 0 where d = 0; its deviance residuals; and its expected value and variance for a
 * given model, summed exactly over the Poisson distribution of each channel (the quantities
 * Kaastra 2017, A&A 605, A51 approximates) — a goodness measure that needs no binning.
 */
import { logFactorial } from './random.ts';
import { exp, log } from '../numeric/index.ts';

/** Model values below this many counts are raised to it: keeps C finite where data fall in channels the model leaves empty. */
export const MODEL_FLOOR_COUNTS = 1e-10;
/** Terms of the Poisson sum beyond this many standard deviations from the mean are dropped (their weight < 1e-30). */
const POISSON_SUM_SIGMAS = 12;
const POISSON_SUM_EXTRA = 30;

/** One channel's contribution 2 (m − d + d ln(d/m)). */
export function cTerm(m: number, d: number): number {
  const mm = m > MODEL_FLOOR_COUNTS ? m : MODEL_FLOOR_COUNTS;
  return d > 0 ? 2 * (mm - d + d * log(d / mm)) : 2 * mm;
}

export function cstat(model: ArrayLike<number>, data: ArrayLike<number>, channels?: ArrayLike<number>): number {
  let s = 0;
  if (channels) for (let j = 0; j < channels.length; j++) s += cTerm(model[channels[j]], data[channels[j]]);
  else for (let i = 0; i < model.length; i++) s += cTerm(model[i], data[i]);
  return s;
}

/** sign(m − d) √(cTerm): their squares sum to C, so least squares on them minimises C. */
export function devianceResidual(m: number, d: number): number {
  const t = Math.sqrt(Math.max(0, cTerm(m, d)));
  return m >= d ? t : -t;
}

/** E[C] and Var[C] of one channel whose counts are Poisson with mean m, at model m. */
export function expectedCTerm(m: number): { mean: number; variance: number } {
  if (!(m > 0)) return { mean: 0, variance: 0 };
  const lo = Math.max(0, Math.floor(m - POISSON_SUM_SIGMAS * Math.sqrt(m) - POISSON_SUM_EXTRA));
  const hi = Math.ceil(m + POISSON_SUM_SIGMAS * Math.sqrt(m) + POISSON_SUM_EXTRA);
  const lm = log(m);
  let s1 = 0;
  let s2 = 0;
  let p = exp(lo * lm - m - logFactorial(lo));
  for (let k = lo; k <= hi; k++) {
    if (k > lo) p *= m / k;
    const c = cTerm(m, k);
    s1 += p * c;
    s2 += p * c * c;
  }
  return { mean: s1, variance: Math.max(0, s2 - s1 * s1) };
}

export interface Goodness {
  cstat: number;
  expected: number;
  sigma: number;
  /** (C − E[C]) / σ_C: a value beyond about ±3 says the model does not describe the data. */
  z: number;
}

/** Goodness of a best fit: the observed C against its expectation for that model (the fitted parameters' few degrees of freedom are not subtracted). */
export function goodness(model: ArrayLike<number>, data: ArrayLike<number>, channels: ArrayLike<number>): Goodness {
  let e = 0;
  let v = 0;
  for (let j = 0; j < channels.length; j++) {
    const t = expectedCTerm(model[channels[j]]);
    e += t.mean;
    v += t.variance;
  }
  const c = cstat(model, data, channels);
  const sigma = Math.sqrt(v);
  return { cstat: c, expected: e, sigma, z: sigma > 0 ? (c - e) / sigma : 0 };
}
