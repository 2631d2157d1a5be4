/**
 * Natural logarithm, the same bits in every JavaScript engine (see exp.ts for why).
 *
 * fdlibm's e_log.c (Sun Microsystems, 1993; freely redistributable), IEEE double operations only:
 * x = 2^k·(1+f) with √2/2 < 1+f < √2, then log(1+f) = f − s·(f − R) with s = f/(2+f) and R a
 * Remez polynomial in s². Error below 1 ulp. Constants are fdlibm's.
 */
import { highWord, lowWord, withHighWord } from './bits.ts';
import { LG1, LG2, LG3, LG4, LG5, LG6, LG7, LN2_HI, LN2_LO } from './constants.ts';

/** 2⁵⁴: lifts a subnormal argument into the normal range. */
const TWO54 = 1.8014398509481984e16;

export function log(x: number): number {
  let hx = highWord(x);
  let k = 0;
  if (hx < 0x00100000) {
    // x < 2⁻¹⁰²²: zero, negative or subnormal.
    if (((hx & 0x7fffffff) | lowWord(x)) === 0) return -Infinity;
    if (hx < 0) return NaN;
    k -= 54;
    x *= TWO54;
    hx = highWord(x);
  }
  if (hx >= 0x7ff00000) return x + x; // +Infinity or NaN
  k += (hx >> 20) - 1023;
  hx &= 0x000fffff;
  const i0 = (hx + 0x95f64) & 0x100000;
  x = withHighWord(x, hx | (i0 ^ 0x3ff00000)); // normalise x or x/2 into [√2/2, √2)
  k += i0 >> 20;
  const f = x - 1;
  const dk = k;
  if ((0x000fffff & (2 + hx)) < 3) {
    // |f| < 2⁻²⁰
    if (f === 0) return k === 0 ? 0 : dk * LN2_HI + dk * LN2_LO;
    const r = f * f * (0.5 - 0.33333333333333333 * f);
    return k === 0 ? f - r : dk * LN2_HI - (r - dk * LN2_LO - f);
  }
  const s = f / (2 + f);
  const z = s * s;
  const w = z * z;
  const t1 = w * (LG2 + w * (LG4 + w * LG6));
  const t2 = z * (LG1 + w * (LG3 + w * (LG5 + w * LG7)));
  const i = (hx - 0x6147a) | (0x6b851 - hx);
  const r = t2 + t1;
  if (i > 0) {
    const hfsq = 0.5 * f * f;
    return k === 0 ? f - (hfsq - s * (hfsq + r)) : dk * LN2_HI - (hfsq - (s * (hfsq + r) + dk * LN2_LO) - f);
  }
  return k === 0 ? f - s * (f - r) : dk * LN2_HI - (s * (f - r) - dk * LN2_LO - f);
}
