/**
 * Seeded random numbers for simulated spectra: xoshiro128** (Blackman & Vigna 2018) seeded by
 * splitmix32, and Poisson deviates — multiplication of uniforms (Knuth, TAOCP vol. 2, §3.4.1)
 * below POISSON_SWITCH, Hörmann's transformed rejection PTRS (Insurance: Math. Econ. 12, 1993)
 * above. Same seed, same numbers, on every platform that has IEEE doubles.
 */
import { exp, log } from '../numeric/index.ts';

/** Below this mean the multiplication method is exact and fast enough (Hörmann's PTRS needs λ ≥ 10). */
const POISSON_SWITCH = 30;

export type Uniform = () => number;

function splitmix32(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x9e3779b9) >>> 0;
    let z = s;
    z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
    z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
    return (z ^ (z >>> 16)) >>> 0;
  };
}

/** Uniform deviates in [0, 1) with 32 random bits, from an integer seed. */
export function uniformSource(seed: number): Uniform {
  const sm = splitmix32(seed);
  let a = sm();
  let b = sm();
  let c = sm();
  let d = sm();
  return () => {
    const t = b << 9;
    let r = Math.imul(b, 5);
    r = Math.imul((r << 7) | (r >>> 25), 9);
    c ^= a;
    d ^= b;
    b ^= c;
    a ^= d;
    c ^= t;
    d = (d << 11) | (d >>> 21);
    return (r >>> 0) / 4294967296;
  };
}

/** ln k! exactly for small k, Stirling's series beyond (error < 1e-14 for k ≥ 16). */
const LOG_FACT = (() => {
  const t = new Float64Array(16);
  for (let k = 1; k < 16; k++) t[k] = t[k - 1] + log(k);
  return t;
})();
export function logFactorial(k: number): number {
  if (k < 16) return LOG_FACT[k];
  const x = k + 1;
  const ix2 = 1 / (x * x);
  return (x - 0.5) * log(x) - x + 0.5 * log(2 * Math.PI) + (1 / x) * (1 / 12 - ix2 * (1 / 360 - ix2 * (1 / 1260 - ix2 / 1680)));
}

export function poisson(lambda: number, u: Uniform): number {
  if (!(lambda > 0)) return 0;
  if (lambda < POISSON_SWITCH) {
    const limit = exp(-lambda);
    let k = 0;
    let p = u();
    while (p > limit) {
      k++;
      p *= u();
    }
    return k;
  }
  const slam = Math.sqrt(lambda);
  const loglam = log(lambda);
  const b = 0.931 + 2.53 * slam;
  const a = -0.059 + 0.02483 * b;
  const invalpha = 1.1239 + 1.1328 / (b - 3.4);
  const vr = 0.9277 - 3.6224 / (b - 2);
  for (;;) {
    const U = u() - 0.5;
    const V = u();
    const us = 0.5 - Math.abs(U);
    const k = Math.floor(((2 * a) / us + b) * U + lambda + 0.43);
    if (us >= 0.07 && V <= vr) return k;
    if (k < 0 || (us < 0.013 && V > us)) continue;
    if (log(V) + log(invalpha) - log(a / (us * us) + b) <= -lambda + k * loglam - logFactorial(k)) return k;
  }
}

/** One Poisson draw per expected value, from one seed. */
export function poissonDraws(expected: ArrayLike<number>, seed: number): Float64Array {
  const u = uniformSource(seed);
  const out = new Float64Array(expected.length);
  for (let i = 0; i < expected.length; i++) out[i] = poisson(expected[i], u);
  return out;
}
