/**
 * e^x − 1 without cancellation near 0, the same bits in every JavaScript engine (see exp.ts).
 * fdlibm's s_expm1.c (Sun Microsystems, 1993; freely redistributable): reduction x = k·ln2 + r,
 * a rational approximation of r's part with a correction term for the reduction's rounding, then
 * the exponent put back; error below 1 ulp. Constants are fdlibm's.
 */
import { fromWords, highWord, lowWord, scaleByPowerOfTwo } from './bits.ts';
import { INV_LN2, LN2_HI, LN2_LO } from './constants.ts';

/** Above this, e^x − 1 overflows. */
const OVERFLOW_ABOVE = 7.09782712893383973096e2;
const Q1 = -3.33333333333331316428e-2; // 0xbfa11111 0x111110f4
const Q2 = 1.58730158725481460165e-3; // 0x3f5a01a0 0x19fe5585
const Q3 = -7.93650757867487942473e-5; // 0xbf14ce19 0x9eaadbb7
const Q4 = 4.00821782732936239552e-6; // 0x3ed0cfca 0x86e65239
const Q5 = -2.01099218183624371326e-7; // 0xbe8afdb7 0x6e09c32d

export function expm1(x: number): number {
  const hx0 = highWord(x);
  const negative = hx0 < 0;
  const hx = hx0 & 0x7fffffff;
  if (hx >= 0x4043687a) {
    // |x| ≥ 56·ln2
    if (hx >= 0x40862e42) {
      if (hx >= 0x7ff00000) {
        if (((hx & 0xfffff) | lowWord(x)) !== 0) return NaN;
        return negative ? -1 : Infinity;
      }
      if (x > OVERFLOW_ABOVE) return Infinity;
    }
    if (negative) return -1; // e^x < 2⁻⁵⁶: −1 to within half an ulp
  }
  let k = 0;
  let c = 0;
  if (hx > 0x3fd62e42) {
    // |x| > ln2/2: reduce.
    let hi: number;
    let lo: number;
    if (hx < 0x3ff0a2b2) {
      hi = negative ? x + LN2_HI : x - LN2_HI;
      lo = negative ? -LN2_LO : LN2_LO;
      k = negative ? -1 : 1;
    } else {
      k = Math.trunc(INV_LN2 * x + (negative ? -0.5 : 0.5));
      hi = x - k * LN2_HI;
      lo = k * LN2_LO;
    }
    x = hi - lo;
    c = hi - x - lo;
  } else if (hx < 0x3c900000) {
    return x; // |x| < 2⁻⁵⁴
  }
  const hfx = 0.5 * x;
  const hxs = x * hfx;
  const r1 = 1 + hxs * (Q1 + hxs * (Q2 + hxs * (Q3 + hxs * (Q4 + hxs * Q5))));
  const t = 3 - r1 * hfx;
  let e = hxs * ((r1 - t) / (6 - x * t));
  if (k === 0) return x - (x * e - hxs);
  e = x * (e - c) - c;
  e -= hxs;
  if (k === -1) return 0.5 * (x - e) - 0.5;
  if (k === 1) return x < -0.25 ? -2 * (e - (x + 0.5)) : 1 + 2 * (x - e);
  if (k <= -2 || k > 56) return scaleByPowerOfTwo(1 - (e - x), k) - 1;
  if (k < 20) return scaleByPowerOfTwo(fromWords(0x3ff00000 - (0x200000 >> k), 0) - (e - x), k); // (1 − 2⁻ᵏ) − (e − x)
  return scaleByPowerOfTwo(x - (e + fromWords((0x3ff - k) << 20, 0)) + 1, k); // 2⁻ᵏ
}

