/** Seeded normals for synthetic data (generator in scripts/prng.ts). */
import { mulberry32 } from '../../scripts/prng.ts';

export { mulberry32 };

export function normalSampler(seed: number): () => number {
  const u = mulberry32(seed);
  return () => {
    const u1 = Math.max(u(), 1e-300);
    return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u());
  };
}
