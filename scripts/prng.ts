/**
 * Seeded pseudo-random numbers for invented demo data, fixtures and synthetic test data (never
 * for products: the build is deterministic). mulberry32 (a public-domain 32-bit generator) and
 * Box–Muller normal deviates.
 */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal deviates from a uniform source, by Box–Muller. */
export function gaussian(uniform: () => number): () => number {
  return () => {
    const u = 1 - uniform(); // (0, 1]
    const v = uniform();
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
  };
}
