/** Seeded argument sets for the elementary-function tests (mulberry32, a public-domain 32-bit PRNG). */
export function mulberry32(seed: number): () => number {
  let a = seed | 0;
  return () => {
    a = (a + 0x6d2b79f5) | 0;
    let t = Math.imul(a ^ (a >>> 15), 1 | a);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

export interface Samples {
  /** exp arguments over the whole finite range, most of them near 0 where physics lives. */
  exp: number[];
  /** Positive log arguments from 1e-300 to 1e300, and subnormals. */
  log: number[];
  /** expm1/log1p arguments in (−0.95, 0.95), where cancellation matters. */
  small: number[];
  /** pow bases and exponents: positive bases, real exponents of both signs. */
  powBase: number[];
  powExp: number[];
}

export function samples(n: number, seed = 20261202): Samples {
  const r = mulberry32(seed);
  const s: Samples = { exp: [], log: [], small: [], powBase: [], powExp: [] };
  for (let i = 0; i < n; i++) {
    s.exp.push((r() - 0.5) * 1400 * r() ** 4); // within ±700: finite for glibc too
    s.log.push(i % 97 === 0 ? r() * 4e-310 : Math.exp((r() - 0.5) * 1380));
    s.small.push((r() - 0.5) * 1.9 * r() ** 4);
    s.powBase.push(Math.exp((r() - 0.5) * 60));
    s.powExp.push((r() - 0.5) * 20 * r() ** 2);
  }
  return s;
}

/** Distance in units in the last place between two finite doubles of the same sign. */
export function ulpDistance(a: number, b: number): number {
  if (Object.is(a, b)) return 0;
  const f = new Float64Array([a, b]);
  const i = new BigInt64Array(f.buffer);
  const d = i[0] - i[1];
  return Number(d < 0n ? -d : d);
}

/** The bit pattern of a double as 16 hex digits (NaN, ±0 and ±Infinity included). */
export function bits(x: number): string {
  const v = new DataView(new ArrayBuffer(8));
  v.setFloat64(0, x);
  return v.getBigUint64(0).toString(16).padStart(16, '0');
}
