/**
 * e^x, the same bits in every JavaScript engine.
 *
 * ECMAScript leaves Math.exp's last bit to the engine (ECMA-262 §21.3.2.14, "implementation-
 * approximated"), and Chromium's differs from Node 20's for about one input in ten, so a response
 * built in the observer's browser would not equal the published bytes. This is the algorithm of
 * fdlibm's e_exp.c (Sun Microsystems, 1993; freely redistributable), written with IEEE 754 double
 * operations only, which JavaScript specifies exactly: error below 1 ulp. The constants are
 * fdlibm's (hex patterns in the comments).
 */
import { highWord, lowWord, scaleByPowerOfTwo } from './bits.ts';
import { INV_LN2, LN2_HI, LN2_LO, P1, P2, P3, P4, P5 } from './constants.ts';

/** Above this, e^x overflows (ln of the largest double). */
const OVERFLOW_ABOVE = 7.09782712893383973096e2;
/** Below this, e^x underflows to 0 (ln of half the smallest subnormal). */
const UNDERFLOW_BELOW = -7.45133219101941108420e2;

export function exp(x: number): number {
  // V8 returns Math.E for e¹ (fdlibm gives the double one ulp above); kept so Node's bytes do not move.
  if (x === 1) return Math.E;
  const hx = highWord(x);
  const negative = hx < 0;
  const ahx = hx & 0x7fffffff;
  if (ahx >= 0x40862e42) {
    // |x| ≥ 709.78…: non-finite, overflow or underflow.
    if (ahx >= 0x7ff00000) {
      if (((ahx & 0xfffff) | lowWord(x)) !== 0) return NaN;
      return negative ? 0 : Infinity;
    }
    if (x > OVERFLOW_ABOVE) return Infinity;
    if (x < UNDERFLOW_BELOW) return 0;
  }
  // Argument reduction: x = k·ln2 + r with |r| ≤ ln2/2, r carried as hi − lo.
  let hi = 0;
  let lo = 0;
  let k = 0;
  let r = x;
  if (ahx > 0x3fd62e42) {
    // |x| > ln2/2
    if (ahx < 0x3ff0a2b2) {
      // and |x| < 1.5·ln2
      hi = negative ? x + LN2_HI : x - LN2_HI;
      lo = negative ? -LN2_LO : LN2_LO;
      k = negative ? -1 : 1;
    } else {
      k = Math.trunc(INV_LN2 * x + (negative ? -0.5 : 0.5));
      hi = x - k * LN2_HI;
      lo = k * LN2_LO;
    }
    r = hi - lo;
  } else if (ahx < 0x3e300000) {
    // |x| < 2⁻²⁸: e^x = 1 + x to within half an ulp.
    return 1 + x;
  }
  const t = r * r;
  const c = r - t * (P1 + t * (P2 + t * (P3 + t * (P4 + t * P5))));
  if (k === 0) return 1 - ((r * c) / (c - 2) - r);
  const y = 1 - (lo - (r * c) / (2 - c) - hi);
  return scaleByPowerOfTwo(y, k);
}
