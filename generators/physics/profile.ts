/**
 * The measured-energy profile of monochromatic photons of true energy E: a mixture of components
 * whose CDFs are closed forms, so channel probabilities are CDF differences.
 *
 *  - core: Gaussian N(c, σ)
 *  - tail: low-energy exponential tail (scale τ) convolved with the same Gaussian — the exponentially
 *    modified Gaussian of X = c − Y + G, Y ~ Exp(τ), G ~ N(0, σ):
 *      F(x) = Φ(u/σ) + exp(u/τ + σ²/2τ²)·Φ(−u/σ − σ/τ),  u = x − c
 *    the second term is evaluated as ½·exp(−u²/2σ²)·erfcx(a), a = (u/σ + σ/τ)/√2, when a ≥ 0,
 *    so it never overflows (the exponent of the plain form is large exactly where erfc underflows);
 *  - shelf: flat from the lowest channel energy up to c, convolved with the Gaussian;
 *  - escape: Si Kα escape peak, Gaussian at the centroid and σ of energy E − E_Kα;
 *  - fluorescence: Si Kα line from the detector's own surface layers, Gaussian at E_Kα;
 *  - partial: the partial-charge events of a partially collecting layer (partial-charge.ts), a
 *    truncated exponential on [c0·c, c) convolved with the Gaussian.
 * Fractions sum to 1 (the core takes the rest); events measured below the threshold are lost.
 * Energies in keV.
 */
import { erfc, erfcx, normalCdf, normalPdf, INV_SQRT_2PI, SQRT2 } from './special.ts';
import { KilnInputError } from '../errors.ts';
import type { PartialChargeShape } from './partial-charge.ts';
import { exp, expm1 } from '../numeric/index.ts';

/** Parameters of the profile at one true energy (see generators/response/params.ts). */
export interface ProfileParams {
  centroidKeV: number;
  sigmaKeV: number;
  tailFraction: number;
  tailScaleKeV: number;
  shelfFraction: number;
  escapeFraction: number;
  fluorescenceFraction: number;
  /** Partial-charge events of the collection model (absent: none; the empirical tail may stand in). */
  partial?: PartialChargeShape;
}

export type ProfileComponent =
  | { kind: 'gaussian'; role: 'core' | 'escape' | 'fluorescence'; fraction: number; centroidKeV: number; sigmaKeV: number }
  | { kind: 'tail'; fraction: number; centroidKeV: number; sigmaKeV: number; scaleKeV: number }
  | { kind: 'shelf'; fraction: number; lowKeV: number; highKeV: number; sigmaKeV: number }
  /** Density ∝ exp(−rate·(y − low)) on [low, high), convolved with N(0, σ). */
  | { kind: 'partial'; fraction: number; lowKeV: number; highKeV: number; ratePerKeV: number; sigmaKeV: number }
  /** Core and tail of one line together (same centroid and σ): one Φ per point serves both. */
  | { kind: 'peak'; fraction: number; centroidKeV: number; sigmaKeV: number; scaleKeV: number; tailShare: number };

/** Gaussian window half-width in σ beyond which a component's CDF is taken as exactly 0 or 1 (Φ(−8) ≈ 6e-16). */
export const WINDOW_SIGMAS = 8;
/** Tail e-foldings below the centroid beyond which the tail's CDF is taken as 0 (e^-36 ≈ 2e-16). */
export const TAIL_EFOLDINGS = 36;

// ---- component CDFs (unit mass) ----

export function gaussianCdf(x: number, c: number, s: number): number {
  return 0.5 * erfc((c - x) / (s * SQRT2));
}

export function gaussianPdf(x: number, c: number, s: number): number {
  return normalPdf((x - c) / s) / s;
}

/** exp(u/τ + σ²/2τ²)·Φ(−u/σ − σ/τ): the tail part of the EMG CDF (τ times its density). */
function emgTerm(u: number, s: number, tau: number): number {
  const a = (u / s + s / tau) / SQRT2;
  if (a >= 0) return 0.5 * exp((-0.5 * u * u) / (s * s)) * erfcx(a);
  return 0.5 * exp(u / tau + (0.5 * s * s) / (tau * tau)) * erfc(a);
}

/** CDF of the low-energy exponentially modified Gaussian. */
export function emgLowTailCdf(x: number, c: number, s: number, tau: number): number {
  const u = x - c;
  return normalCdf(u / s) + emgTerm(u, s, tau);
}

/** Density of the low-energy exponentially modified Gaussian. */
export function emgLowTailPdf(x: number, c: number, s: number, tau: number): number {
  return emgTerm(x - c, s, tau) / tau;
}

/** ψ(z) = ∫_{−∞}^{z} Φ(t) dt = z·Φ(z) + φ(z), stable for both signs. */
function psi(z: number): number {
  // ψ(−z) < φ(z)/z² < 1e-16 beyond the Gaussian window: ψ(z) = z and ψ(−z) = 0 to double precision.
  if (z >= WINDOW_SIGMAS) return z;
  if (z <= -WINDOW_SIGMAS) return 0;
  if (z > 0) return z + psi(-z);
  // z ≤ 0: Φ(z) = ½·erfcx(−z/√2)·exp(−z²/2)
  const g = exp(-0.5 * z * z);
  return g * (0.5 * z * erfcx(-z / SQRT2) + INV_SQRT_2PI);
}

/** CDF of Uniform[lo, hi] convolved with N(0, σ). */
export function shelfCdf(x: number, lo: number, hi: number, s: number): number {
  const width = hi - lo;
  if (width <= 1e-9 * s) return gaussianCdf(x, lo, s);
  // far from both edges the convolution is exactly linear/0/1 to double precision
  if (x <= lo - WINDOW_SIGMAS * s) return 0;
  if (x >= hi + WINDOW_SIGMAS * s) return 1;
  if (x >= lo + WINDOW_SIGMAS * s && x <= hi - WINDOW_SIGMAS * s) return (x - lo) / width;
  return ((psi((x - lo) / s) - psi((x - hi) / s)) * s) / width;
}

/** Below this rate × width the truncated exponential is flat to 1e-6 and the shelf's closed form is used. */
const FLAT_BELOW = 1e-6;

/** Φ((x − a)/σ) − exp(−k(x − a) + k²σ²/2)·Φ((x − a)/σ − kσ): CDF of a + Exp(k) + N(0, σ). */
function highEmgCdf(x: number, a: number, s: number, k: number): number {
  return normalCdf((x - a) / s) - emgTerm(a - x, s, 1 / k);
}

/**
 * CDF of the truncated exponential on [lo, hi) (density ∝ e^{−k(y − lo)}) convolved with N(0, σ):
 * the exponential from lo minus its part beyond hi, which is e^{−k(hi − lo)} times the same
 * exponential started at hi.
 */
export function partialCdf(x: number, lo: number, hi: number, k: number, s: number): number {
  const kw = k * (hi - lo);
  if (kw < FLAT_BELOW) return shelfCdf(x, lo, hi, s);
  const tailBeyond = exp(-kw);
  return (highEmgCdf(x, lo, s, k) - tailBeyond * highEmgCdf(x, hi, s, k)) / -expm1(-kw);
}

export function partialPdf(x: number, lo: number, hi: number, k: number, s: number): number {
  const kw = k * (hi - lo);
  if (kw < FLAT_BELOW) return shelfPdf(x, lo, hi, s);
  // d/dx of highEmgCdf is k·exp(−k(x − a) + k²σ²/2)·Φ((x − a)/σ − kσ) = k·emgTerm(a − x, σ, 1/k)
  return (k * (emgTerm(lo - x, s, 1 / k) - exp(-kw) * emgTerm(hi - x, s, 1 / k))) / -expm1(-kw);
}

export function shelfPdf(x: number, lo: number, hi: number, s: number): number {
  const width = hi - lo;
  if (width <= 1e-9 * s) return gaussianPdf(x, lo, s);
  return (normalCdf((x - lo) / s) - normalCdf((x - hi) / s)) / width;
}

/** Energy range outside which the component CDF is 0 (below) or 1 (above) to ~1e-15. */
export function componentWindow(c: ProfileComponent): [number, number] {
  switch (c.kind) {
    case 'gaussian':
      return [c.centroidKeV - WINDOW_SIGMAS * c.sigmaKeV, c.centroidKeV + WINDOW_SIGMAS * c.sigmaKeV];
    case 'tail':
    case 'peak':
      return [c.centroidKeV - TAIL_EFOLDINGS * c.scaleKeV - WINDOW_SIGMAS * c.sigmaKeV, c.centroidKeV + WINDOW_SIGMAS * c.sigmaKeV];
    case 'shelf':
    case 'partial':
      return [c.lowKeV - WINDOW_SIGMAS * c.sigmaKeV, c.highKeV + WINDOW_SIGMAS * c.sigmaKeV];
  }
}

/**
 * Φ(u/σ) + a·(EMG tail term), clamped to 0/1 outside [wlo, whi]: the tail's CDF (a = 1) and that
 * of a core and tail merged (a = the tail's share).
 */
function emgMixtureCdf(mu: number, s: number, tau: number, a: number, wlo: number, whi: number): (x: number) => number {
  // below this u the Gaussian parts are 0 and 1 to double precision: F = a·exp(u/τ + σ²/2τ²)
  const uFast = -s * (WINDOW_SIGMAS + s / tau);
  const shift = (0.5 * s * s) / (tau * tau);
  return (x) => {
    if (x <= wlo) return 0;
    if (x >= whi) return 1;
    const u = x - mu;
    if (u < uFast) return a * exp(u / tau + shift);
    return normalCdf(u / s) + a * emgTerm(u, s, tau);
  };
}

/**
 * A fast unit-mass CDF of one component, exact inside its window up to ~1e-15, clamped to 0/1
 * outside it; clamped so that sums over channels telescope exactly.
 */
export function componentCdf(c: ProfileComponent): (x: number) => number {
  const [wlo, whi] = componentWindow(c);
  switch (c.kind) {
    case 'gaussian': {
      const mu = c.centroidKeV;
      const k = 1 / (c.sigmaKeV * SQRT2);
      return (x) => (x <= wlo ? 0 : x >= whi ? 1 : 0.5 * erfc((mu - x) * k));
    }
    case 'tail':
      return emgMixtureCdf(c.centroidKeV, c.sigmaKeV, c.scaleKeV, 1, wlo, whi);
    case 'shelf': {
      const { lowKeV, highKeV, sigmaKeV } = c;
      return (x) => (x <= wlo ? 0 : x >= whi ? 1 : shelfCdf(x, lowKeV, highKeV, sigmaKeV));
    }
    case 'partial': {
      const { lowKeV, highKeV, ratePerKeV, sigmaKeV } = c;
      return (x) => (x <= wlo ? 0 : x >= whi ? 1 : partialCdf(x, lowKeV, highKeV, ratePerKeV, sigmaKeV));
    }
    case 'peak':
      // (1 − a)·Φ(u/σ) + a·(Φ(u/σ) + emgTerm) = Φ(u/σ) + a·emgTerm, a the tail's share.
      return emgMixtureCdf(c.centroidKeV, c.sigmaKeV, c.scaleKeV, c.tailShare, wlo, whi);
  }
}

/**
 * The same mixture with the core and the tail of the line merged into one 'peak' component
 * (their CDFs share Φ(u/σ)): the matrix builder evaluates fewer special functions per channel.
 */
export function mergeCoreAndTail(components: readonly ProfileComponent[]): ProfileComponent[] {
  const core = components.find((c) => c.kind === 'gaussian' && c.role === 'core');
  const tail = components.find((c) => c.kind === 'tail');
  if (!core || core.kind !== 'gaussian' || !tail || tail.kind !== 'tail') return [...components];
  if (core.centroidKeV !== tail.centroidKeV || core.sigmaKeV !== tail.sigmaKeV) return [...components];
  const fraction = core.fraction + tail.fraction;
  const peak: ProfileComponent = {
    kind: 'peak',
    fraction,
    centroidKeV: tail.centroidKeV,
    sigmaKeV: tail.sigmaKeV,
    scaleKeV: tail.scaleKeV,
    tailShare: tail.fraction / fraction,
  };
  return [peak, ...components.filter((c) => c !== core && c !== tail)];
}

export function componentPdf(c: ProfileComponent, x: number): number {
  switch (c.kind) {
    case 'gaussian':
      return gaussianPdf(x, c.centroidKeV, c.sigmaKeV);
    case 'tail':
      return emgLowTailPdf(x, c.centroidKeV, c.sigmaKeV, c.scaleKeV);
    case 'shelf':
      return shelfPdf(x, c.lowKeV, c.highKeV, c.sigmaKeV);
    case 'partial':
      return partialPdf(x, c.lowKeV, c.highKeV, c.ratePerKeV, c.sigmaKeV);
    case 'peak':
      return (1 - c.tailShare) * gaussianPdf(x, c.centroidKeV, c.sigmaKeV) + c.tailShare * emgLowTailPdf(x, c.centroidKeV, c.sigmaKeV, c.scaleKeV);
  }
}

/** What a profile needs besides its own parameters. */
export interface ProfileContext {
  /** Lower energy of the lowest channel: where the shelf starts. */
  shelfLowKeV: number;
  /** Centroid and σ of the escape peak (those of energy E − E_Kα); needed when escapeFraction > 0. */
  escape?: { centroidKeV: number; sigmaKeV: number };
  /** Centroid and σ of the Si Kα fluorescence line; needed when fluorescenceFraction > 0. */
  fluorescence?: { centroidKeV: number; sigmaKeV: number };
}

/** Throws KilnInputError when the fractions are not in [0, 1] or sum above 1. */
export function checkFractions(p: ProfileParams, energyKeV: number): void {
  const names = ['tailFraction', 'shelfFraction', 'escapeFraction', 'fluorescenceFraction'] as const;
  let sum = 0;
  for (const n of names) {
    const v = p[n];
    if (!(v >= 0 && v <= 1))
      throw new KilnInputError(`profile ${n} out of range at ${energyKeV} keV`, { field: n, value: v, expected: 'in [0, 1]' });
    sum += v;
  }
  if (p.partial) {
    const v = p.partial.fraction;
    if (!(v >= 0 && v <= 1)) throw new KilnInputError(`partial-charge fraction out of range at ${energyKeV} keV`, { field: 'partial.fraction', value: v, expected: 'in [0, 1]' });
    sum += v;
  }
  if (sum > 1)
    throw new KilnInputError(`profile fractions sum above 1 at ${energyKeV} keV`, { field: names.join('+'), value: sum, expected: '≤ 1' });
  if (!(p.sigmaKeV > 0)) throw new KilnInputError(`profile width must be > 0 at ${energyKeV} keV`, { field: 'sigmaKeV', value: p.sigmaKeV, expected: '> 0' });
  if (p.tailFraction > 0 && !(p.tailScaleKeV > 0))
    throw new KilnInputError(`tail scale must be > 0 where the tail fraction is > 0 (at ${energyKeV} keV)`, { field: 'tailScaleKeV', value: p.tailScaleKeV, expected: '> 0' });
}

/** The profile's components (those with a non-zero fraction); fractions sum to 1. */
export function profileComponents(p: ProfileParams, ctx: ProfileContext, energyKeV = p.centroidKeV): ProfileComponent[] {
  checkFractions(p, energyKeV);
  const out: ProfileComponent[] = [];
  const partial = p.partial?.fraction ?? 0;
  const core = 1 - p.tailFraction - p.shelfFraction - p.escapeFraction - p.fluorescenceFraction - partial;
  if (core > 0) out.push({ kind: 'gaussian', role: 'core', fraction: core, centroidKeV: p.centroidKeV, sigmaKeV: p.sigmaKeV });
  if (p.tailFraction > 0)
    out.push({ kind: 'tail', fraction: p.tailFraction, centroidKeV: p.centroidKeV, sigmaKeV: p.sigmaKeV, scaleKeV: p.tailScaleKeV });
  if (p.shelfFraction > 0) {
    const lo = Math.min(ctx.shelfLowKeV, p.centroidKeV);
    out.push({ kind: 'shelf', fraction: p.shelfFraction, lowKeV: lo, highKeV: p.centroidKeV, sigmaKeV: p.sigmaKeV });
  }
  if (p.partial && partial > 0)
    out.push({
      kind: 'partial',
      fraction: partial,
      lowKeV: p.partial.lowShare * p.centroidKeV,
      highKeV: p.centroidKeV,
      // the rate is per unit of collected fraction; per keV of measured energy it scales with 1/c
      ratePerKeV: p.partial.rateAcrossLayer / p.centroidKeV,
      // partial events are read with the noise of the core (their smaller Fano term is neglected)
      sigmaKeV: p.sigmaKeV,
    });
  if (p.escapeFraction > 0) {
    if (!ctx.escape) throw new Error('profileComponents: escape fraction > 0 but no escape-peak centroid/σ given');
    out.push({ kind: 'gaussian', role: 'escape', fraction: p.escapeFraction, ...ctx.escape });
  }
  if (p.fluorescenceFraction > 0) {
    if (!ctx.fluorescence) throw new Error('profileComponents: fluorescence fraction > 0 but no line centroid/σ given');
    out.push({ kind: 'gaussian', role: 'fluorescence', fraction: p.fluorescenceFraction, ...ctx.fluorescence });
  }
  return out;
}

/** Mixture CDF before the threshold. */
export function profileCdf(components: readonly ProfileComponent[], x: number): number {
  let s = 0;
  for (const c of components) s += c.fraction * componentCdf(c)(x);
  return s;
}

export function profilePdf(components: readonly ProfileComponent[], x: number): number {
  let s = 0;
  for (const c of components) s += c.fraction * componentPdf(c, x);
  return s;
}

/** Fraction of events lost below the event threshold. */
export function thresholdLoss(components: readonly ProfileComponent[], thresholdKeV: number): number {
  return profileCdf(components, thresholdKeV);
}

/** Detected-events CDF: 0 below the threshold, F(x) − F(threshold) above (total 1 − loss). */
export function detectedCdf(components: readonly ProfileComponent[], thresholdKeV: number, x: number): number {
  if (x <= thresholdKeV) return 0;
  return profileCdf(components, x) - profileCdf(components, thresholdKeV);
}
