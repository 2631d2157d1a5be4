/**
 * ln(1 + x) without cancellation near 0, the same bits in every JavaScript engine (see exp.ts).
 * fdlibm's s_log1p.c (Sun Microsystems, 1993; freely redistributable): 1 + x = 2^k·(1+f) with a
 * correction c for the rounding of 1 + x, then the log polynomial of log.ts; error below 1 ulp.
 */
import { highWord, withHighWord } from './bits.ts';

const LN2_HI = 6.93147180369123816490e-1; // 0x3fe62e42 0xfee00000
const LN2_LO = 1.90821492927058770002e-10; // 0x3dea39ef 0x35793c76
const LP1 = 6.666666666666735130e-1; // 0x3fe55555 0x55555593
const LP2 = 3.999999999940941908e-1; // 0x3fd99999 0x9997fa04
const LP3 = 2.857142874366239149e-1; // 0x3fd24924 0x94229359
const LP4 = 2.222219843214978396e-1; // 0x3fcc71c5 0x1d8e78af
const LP5 = 1.818357216161805012e-1; // 0x3fc74664 0x96cb03de
const LP6 = 1.531383769920937332e-1; // 0x3fc39a09 0xd078c69f
const LP7 = 1.479819860511658591e-1; // 0x3fc2f112 0xdf3e5244

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
  const r = z * (LP1 + z * (LP2 + z * (LP3 + z * (LP4 + z * (LP5 + z * (LP6 + z * LP7))))));
  return k === 0 ? f - (hfsq - s * (hfsq + r)) : k * LN2_HI - (hfsq - (s * (hfsq + r) + (k * LN2_LO + c)) - f);
}
