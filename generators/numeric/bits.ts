/**
 * Access to the two 32-bit words of an IEEE 754 double, as the functions of this folder need them.
 * One shared 8-byte buffer seen as a double and as two 32-bit words (typed arrays are much faster
 * than DataView calls in the hot loops of the matrix builder); the platform's byte order, found
 * once, says which word is the high one. JavaScript is single-threaded per realm, so no call can
 * interleave.
 */
const f64 = new Float64Array(1);
const i32 = new Int32Array(f64.buffer);
const u32 = new Uint32Array(f64.buffer);
/** Index of the high word (sign, exponent, top of the mantissa): 1 on little-endian platforms. */
const HI = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1 ? 1 : 0;
const LO = 1 - HI;

/** High word of `x` as a signed 32-bit integer (sign bit in bit 31). */
export function highWord(x: number): number {
  f64[0] = x;
  return i32[HI];
}

/** Low word of `x` as an unsigned 32-bit integer. */
export function lowWord(x: number): number {
  f64[0] = x;
  return u32[LO];
}

/** The double with the given high word and `x`'s low word. */
export function withHighWord(x: number, high: number): number {
  f64[0] = x;
  i32[HI] = high | 0;
  return f64[0];
}

/** The double with `x`'s high word and the given low word (fdlibm's `__LO(x) = lo`). */
export function withLowWord(x: number, low: number): number {
  f64[0] = x;
  u32[LO] = low >>> 0;
  return f64[0];
}

/** The double made of the two words. */
export function fromWords(high: number, low: number): number {
  i32[HI] = high | 0;
  u32[LO] = low >>> 0;
  return f64[0];
}

/** Exponent bias of an IEEE 754 double (IEEE 754-2008, table 3.5). */
const EXPONENT_BIAS = 1023;
/** Smallest exponent of a normal double. */
const MIN_NORMAL_EXPONENT = -1022;

/** 2^k for every normal exponent k in [-1022, 1023], made once from their bits (a table read is the fastest exact power of two). */
const POWERS_OF_TWO = (() => {
  const t = new Float64Array(2046);
  for (let k = MIN_NORMAL_EXPONENT; k <= 1023; k++) t[k - MIN_NORMAL_EXPONENT] = fromWords((k + EXPONENT_BIAS) << 20, 0);
  return t;
})();

/** 2^k exactly, for a normal exponent k in [-1022, 1023]. */
function powerOfTwoNormal(k: number): number {
  return POWERS_OF_TWO[k - MIN_NORMAL_EXPONENT];
}

/** 2⁻¹⁰⁰⁰: lets `scaleByPowerOfTwo` reach the subnormal range with a single rounding. */
const TWO_M1000 = powerOfTwoNormal(-1000);

/**
 * y · 2^k for an integer k, rounded once (as C's scalbn): exact unless the result leaves the
 * normal range. Built from exact powers of two, not Math.pow, whose results JavaScript leaves to
 * the engine.
 */
export function scaleByPowerOfTwo(y: number, k: number): number {
  if (k > 1023) return y * powerOfTwoNormal(1023) * powerOfTwoNormal(Math.min(k - 1023, 1023));
  if (k < MIN_NORMAL_EXPONENT) return y * powerOfTwoNormal(Math.max(k + 1000, MIN_NORMAL_EXPONENT)) * TWO_M1000;
  return y * powerOfTwoNormal(k);
}
