/**
 * ln(1 + x) without cancellation near 0, the same bits in every JavaScript engine (see exp.ts).
 * fdlibm's s_log1p.c (Sun Microsystems, 1993; freely redistributable): 1 + x = 2^k·(1+f) with a
 * correction c for the rounding of 1 + x, then the log polynomial of log.ts; error below 1 ulp.
 */
import { highWord, withHighWord } from './bits.ts';
import { LG1, LG2, LG3, LG4, LG5, LG6, LG7, LN2_HI, LN2_LO } from './constants.ts';


export function log1p(x: number): number {
  const hx = highWord(x);
  const ax = hx & 0x7fffffff;
  let k = 1;
  let f = 0;
  let hu = 0;
  let c = 0;
  if (hx < 0x3fda827a) {
    // x < 0.41422
    if (ax >= 0x3ff00000) return x === -1 ? -Infinity : NaN; // x ≤ −1
    if (ax < 0x3e200000) {
      // |x| < 2⁻²⁹
      if (ax < 0x3c900000) return x;
      return x - x * x * 0.5;
    }
    if (hx > 0 || hx <= (0xbfd2bec4 | 0)) {
      // −0.2929 < x < 0.41422: no reduction
      k = 0;
      f = x;
      hu = 1;
    }
  }
  if (hx >= 0x7ff00000) return x + x;
  if (k !== 0) {
    let u: number;
    if (hx < 0x43400000) {
      u = 1 + x;
      hu = highWord(u);
      k = (hu >> 20) - 1023;
      c = k > 0 ? 1 - (u - x) : x - (u - 1); // the rounding of 1 + x
      c /= u;
    } else {
      u = x;
      hu = highWord(u);
      k = (hu >> 20) - 1023;
      c = 0;
    }
    hu &= 0x000fffff;
    if (hu < 0x6a09e) {
      u = withHighWord(u, hu | 0x3ff00000); // normalise u
    } else {
      k += 1;
      u = withHighWord(u, hu | 0x3fe00000); // normalise u/2
      hu = (0x00100000 - hu) >> 2;
    }
    f = u - 1;
  }
  const hfsq = 0.5 * f * f;
  if (hu === 0) {
    // |f| < 2⁻²⁰
    if (f === 0) return k === 0 ? 0 : k * LN2_HI + (c + k * LN2_LO);
    const r = hfsq * (1 - 0.66666666666666666 * f);
    return k === 0 ? f - r : k * LN2_HI - (r - (k * LN2_LO + c) - f);
  }
  const s = f / (2 + f);
  const z = s * s;
  const r = z * (LG1 + z * (LG2 + z * (LG3 + z * (LG4 + z * (LG5 + z * (LG6 + z * LG7))))));
  return k === 0 ? f - (hfsq - s * (hfsq + r)) : k * LN2_HI - (hfsq - (s * (hfsq + r) + (k * LN2_LO + c)) - f);
}
