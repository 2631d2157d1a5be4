/**
 * x^y, the same bits in every JavaScript engine (ECMAScript leaves Math.pow and ** to the engine,
 * §6.1.6.1.3; see exp.ts). fdlibm's e_pow.c (Sun Microsystems, 1993; freely redistributable):
 * log₂|x| in extra precision as t1 + t2, the product with y split the same way, then 2^(y·log₂x)
 * by exp.ts's polynomial; error below 1 ulp (fdlibm's claim: 0.5 ulp plus the final rounding).
 * Special values follow ECMAScript's rules, which agree with C99's except pow(±1, ±∞) = NaN.
 */
import { fromWords, highWord, lowWord, scaleByPowerOfTwo, withHighWord, withLowWord } from './bits.ts';
import { P1, P2, P3, P4, P5 } from './constants.ts';

const BP = [1, 1.5];
const DP_H = [0, 5.84962487220764160156e-1]; // 0x3fe2b803 0x40000000: log₂(1.5), high part
const DP_L = [0, 1.35003920212974897128e-8]; // 0x3e4cfdeb 0x43cfd006: its tail
const TWO53 = 9007199254740992;
/** Polynomial for (3/2)·(log(x) − 2s − (2/3)s³), s = (x−1)/(x+1). */
const L1 = 5.99999999999994648725e-1; // 0x3fe33333 0x33333303
const L2 = 4.28571428578550184252e-1; // 0x3fdb6db6 0xdb6fabff
const L3 = 3.33333329818377432918e-1; // 0x3fd55555 0x518f264d
const L4 = 2.72728123808534006489e-1; // 0x3fd17460 0xa91d4101
const L5 = 2.30660745775561754067e-1; // 0x3fcd864a 0x93c9db65
const L6 = 2.06975017800338417784e-1; // 0x3fca7e28 0x4a454eef
const LG2 = 6.93147180559945286227e-1; // 0x3fe62e42 0xfefa39ef
const LG2_H = 6.93147182464599609375e-1; // 0x3fe62e43 0x00000000
const LG2_L = -1.90465429995776804525e-9; // 0xbe205c61 0x0ca86c39
/** −(1024 − log₂(largest double + ½ ulp)): decides overflow at exactly 2¹⁰²⁴. */
const OVT = 8.0085662595372944372e-17;
const CP = 9.61796693925975554329e-1; // 0x3feec709 0xdc3a03fd: 2/(3·ln2)
const CP_H = 9.61796700954437255859e-1; // 0x3feec709 0xe0000000
const CP_L = -7.02846165095275826516e-9; // 0xbe3e2fe0 0x145b01f5
const IVLN2 = 1.44269504088896338700; // 0x3ff71547 0x652b82fe
const IVLN2_H = 1.44269502162933349609; // 0x3ff71547 0x60000000
const IVLN2_L = 1.92596299112661746887e-8; // 0x3e54ae0b 0xf85ddf44

export function pow(x: number, y: number): number {
  const hx = highWord(x);
  const lx = lowWord(x);
  const hy = highWord(y);
  const ly = lowWord(y);
  let ix = hx & 0x7fffffff;
  const iy = hy & 0x7fffffff;

  if ((iy | ly) === 0) return 1; // x^±0 = 1, even for NaN
  if (Number.isNaN(x) || Number.isNaN(y)) return NaN;

  // yIsInt: 0 not an integer, 1 odd integer, 2 even integer (needed only for x < 0).
  let yIsInt = 0;
  if (hx < 0) {
    if (iy >= 0x43400000) yIsInt = 2;
    else if (iy >= 0x3ff00000) {
      const e = (iy >> 20) - 0x3ff;
      if (e > 20) {
        const j = ly >>> (52 - e);
        if ((j << (52 - e)) >>> 0 === ly) yIsInt = 2 - (j & 1);
      } else if (ly === 0) {
        const j = iy >> (20 - e);
        if (j << (20 - e) === iy) yIsInt = 2 - (j & 1);
      }
    }
  }

  if (ly === 0) {
    if (iy === 0x7ff00000) {
      // y = ±∞
      if (((ix - 0x3ff00000) | lx) === 0) return NaN; // ECMAScript: (±1)^±∞ is NaN
      if (ix >= 0x3ff00000) return hy >= 0 ? y : 0;
      return hy < 0 ? -y : 0;
    }
    if (iy === 0x3ff00000) return hy < 0 ? 1 / x : x; // y = ±1
    if (hy === 0x40000000) return x * x; // y = 2
    if (hy === 0x3fe00000 && hx >= 0) return Math.sqrt(x); // y = 0.5, x ≥ +0 (sqrt is exact in IEEE 754)
  }

  let ax = Math.abs(x);
  if (lx === 0 && (ix === 0x7ff00000 || ix === 0 || ix === 0x3ff00000)) {
    // x = ±0, ±∞, ±1
    let z = hy < 0 ? 1 / ax : ax;
    if (hx < 0) {
      if (((ix - 0x3ff00000) | yIsInt) === 0) z = NaN; // (−1)^non-integer
      else if (yIsInt === 1) z = -z;
    }
    return z;
  }

  let n = (hx >> 31) + 1; // 0 for x < 0, 1 otherwise
  if ((n | yIsInt) === 0) return NaN; // (x<0)^non-integer
  const sign = (n | (yIsInt - 1)) === 0 ? -1 : 1; // (−x)^odd

  let t1: number;
  let t2: number;
  if (iy > 0x41e00000) {
    // |y| > 2³¹
    if (iy > 0x43f00000) {
      // |y| > 2⁶⁴: must over- or underflow
      if (ix <= 0x3fefffff) return hy < 0 ? Infinity : 0;
      if (ix >= 0x3ff00000) return hy > 0 ? Infinity : 0;
    }
    if (ix < 0x3fefffff) return hy < 0 ? sign * Infinity : sign * 0;
    if (ix > 0x3ff00000) return hy > 0 ? sign * Infinity : sign * 0;
    // |1 − x| ≤ 2⁻²⁰: log(x) by its series.
    const t = ax - 1;
    const w = t * t * (0.5 - t * (0.3333333333333333333333 - t * 0.25));
    const u = IVLN2_H * t;
    const v = t * IVLN2_L - w * IVLN2;
    t1 = withLowWord(u + v, 0);
    t2 = v - (t1 - u);
  } else {
    n = 0;
    if (ix < 0x00100000) {
      // subnormal x
      ax *= TWO53;
      n -= 53;
      ix = highWord(ax);
    }
    n += (ix >> 20) - 0x3ff;
    const j = ix & 0x000fffff;
    ix = j | 0x3ff00000;
    let k: number;
    if (j <= 0x3988e) k = 0; // |x| < √(3/2)
    else if (j < 0xbb67a) k = 1; // |x| < √3
    else {
      k = 0;
      n += 1;
      ix -= 0x00100000;
    }
    ax = withHighWord(ax, ix);
    // ss = s_h + s_l = (x − 1)/(x + 1) or (x − 1.5)/(x + 1.5)
    let u = ax - BP[k];
    let v = 1 / (ax + BP[k]);
    const ss = u * v;
    const sH = withLowWord(ss, 0);
    let tH = fromWords(((ix >> 1) | 0x20000000) + 0x00080000 + (k << 18), 0);
    let tL = ax - (tH - BP[k]);
    const sL = v * (u - sH * tH - sH * tL);
    let s2 = ss * ss;
    let r = s2 * s2 * (L1 + s2 * (L2 + s2 * (L3 + s2 * (L4 + s2 * (L5 + s2 * L6)))));
    r += sL * (sH + ss);
    s2 = sH * sH;
    tH = withLowWord(3 + s2 + r, 0);
    tL = r - (tH - 3 - s2);
    u = sH * tH;
    v = sL * tH + tL * ss;
    const pH = withLowWord(u + v, 0);
    const pL = v - (pH - u);
    const zH = CP_H * pH;
    const zL = CP_L * pH + pL * CP + DP_L[k];
    const t = n;
    t1 = withLowWord(zL + zH + DP_H[k] + t, 0);
    t2 = zL - (t1 - t - DP_H[k] - zH);
  }

  // (y1 + y2)·(t1 + t2) with y1 the upper bits of y.
  const y1 = withLowWord(y, 0);
  const pL = (y - y1) * t1 + y * t2;
  let pH = y1 * t1;
  let z = pL + pH;
  let j = highWord(z);
  const i = lowWord(z);
  if (j >= 0x40900000) {
    // z ≥ 1024
    if (((j - 0x40900000) | i) !== 0) return sign * Infinity;
    if (pL + OVT > z - pH) return sign * Infinity;
  } else if ((j & 0x7fffffff) >= 0x4090cc00) {
    // z ≤ −1075
    if (((j - (0xc090cc00 | 0)) | i) !== 0) return sign * 0;
    if (pL <= z - pH) return sign * 0;
  }
  // 2^(pH + pL)
  const ia = j & 0x7fffffff;
  let k = (ia >> 20) - 0x3ff;
  n = 0;
  if (ia > 0x3fe00000) {
    // |z| > 0.5: n = nearest integer of z
    n = j + (0x00100000 >> (k + 1));
    k = ((n & 0x7fffffff) >> 20) - 0x3ff;
    const t = fromWords(n & ~(0x000fffff >> k), 0);
    n = ((n & 0x000fffff) | 0x00100000) >> (20 - k);
    if (j < 0) n = -n;
    pH -= t;
  }
  const t = withLowWord(pL + pH, 0);
  const u = t * LG2_H;
  const v = (pL - (t - pH)) * LG2 + t * LG2_L;
  z = u + v;
  const w = v - (z - u);
  const tt = z * z;
  const tt1 = z - tt * (P1 + tt * (P2 + tt * (P3 + tt * (P4 + tt * P5))));
  const r = (z * tt1) / (tt1 - 2) - (w + z * w);
  z = 1 - (r - z);
  return sign * scaleByPowerOfTwo(z, n);
}
