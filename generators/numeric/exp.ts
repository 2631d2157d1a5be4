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
import { fromWords, scaleByPowerOfTwo } from './bits.ts';
import { INV_LN2, LN2_HI, LN2_LO, P1, P2, P3, P4, P5 } from './constants.ts';

/** Above this, e^x overflows (ln of the largest double). */
const OVERFLOW_ABOVE = 7.09782712893383973096e2;
/** Below this, e^x underflows to 0 (ln of half the smallest subnormal). */
const UNDERFLOW_BELOW = -7.45133219101941108420e2;

/** Smallest |x| whose high word is ≥ 0x40862e42 (fdlibm: "|x| ≥ 709.78"). */
const HUGE_FROM = fromWords(0x40862e42, 0);
/** Smallest |x| whose high word is > 0x3fd62e42 (fdlibm: "|x| > ln2/2"). */
const REDUCE_FROM = fromWords(0x3fd62e43, 0);
/** Smallest |x| whose high word is ≥ 0x3ff0a2b2 (fdlibm: "|x| ≥ 1.5 ln2"). */
const NEAR_LN2_BELOW = fromWords(0x3ff0a2b2, 0);
/** 2⁻²⁸ (high word 0x3e300000). */
const TINY_BELOW = fromWords(0x3e300000, 0);

export function exp(x: number): number {
  // V8 returns Math.E for e¹ (fdlibm gives the double one ulp above); kept so Node's bytes do not move.
  if (x === 1) return Math.E;
  // fdlibm tests the high word of |x| against fixed patterns; the same tests on the double itself
  // (each pattern's smallest double, REDUCE_ABOVE etc.) avoid the bit access in the common path.
  const negative = x < 0;
  const ax = negative ? -x : x;
  if (!(ax < HUGE_FROM)) {
    // |x| ≥ 709.78…: NaN, non-finite, overflow or underflow.
    if (x !== x) return NaN;
    if (ax === Infinity) return negative ? 0 : Infinity;
    if (x > OVERFLOW_ABOVE) return Infinity;
    if (x < UNDERFLOW_BELOW) return 0;
  }
  // Argument reduction: x = k·ln2 + r with |r| ≤ ln2/2, r carried as hi − lo.
  let hi = 0;
  let lo = 0;
  let k = 0;
  let r = x;
  if (ax >= REDUCE_FROM) {
    // |x| > ln2/2
    if (ax < NEAR_LN2_BELOW) {
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
  } else if (ax < TINY_BELOW) {
    // |x| < 2⁻²⁸: e^x = 1 + x to within half an ulp.
    return 1 + x;
  }
  const t = r * r;
  const c = r - t * (P1 + t * (P2 + t * (P3 + t * (P4 + t * P5))));
  if (k === 0) return 1 - ((r * c) / (c - 2) - r);
  const y = 1 - (lo - (r * c) / (2 - c) - hi);
  return scaleByPowerOfTwo(y, k);
}
