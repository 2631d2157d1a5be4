/**
 * The C-statistic (Cash 1979, ApJ 228, 939: C = 2 Σ (m − d + d ln(d/m)), the d ln(d/m) term 0
 * where d = 0) on a hand-worked example, and its expected value against Wilks' theorem.
 */
import { describe, expect, it } from 'vitest';
import { cstat, cTerm, expectedCTerm, goodness, poissonDraws } from '../../generators/spectrum/index.ts';

describe('C-statistic', () => {
  it('hand-worked three-channel example (Cash 1979 form)', () => {
    // m = (2, 1, 0.5), d = (3, 0, 1):
    //   channel 1: 2 (2 − 3 + 3 ln 1.5) = 2 (−1 + 3 × 0.4054651081) = 0.4327906486
    //   channel 2: d = 0, so 2 (1 − 0) = 2
    //   channel 3: 2 (0.5 − 1 + 1 × ln 2) = 2 (−0.5 + 0.6931471806) = 0.3862943612
    //   C = 0.4327906486 + 2 + 0.3862943612 = 2.8190850098
    expect(cstat([2, 1, 0.5], [3, 0, 1])).toBeCloseTo(2.8190850098, 9);
    expect(cTerm(1, 0)).toBe(2);
    // C is zero where model = data, positive elsewhere.
    expect(cstat([4, 7], [4, 7])).toBeCloseTo(0, 12);
  });

  it('expected C per channel tends to 1 and its variance to 2 for large means (Wilks 1938: the deviance is χ² with 1 dof)', () => {
    const big = expectedCTerm(5000);
    // Corrections are O(1/m) (common practice, no source): 1e-3 covers them at m = 5000.
    expect(Math.abs(big.mean - 1)).toBeLessThan(1e-3);
    expect(Math.abs(big.variance - 2)).toBeLessThan(5e-3);
  });

  it('expected C at small means agrees with seeded Poisson draws within their scatter', () => {
    for (const m of [0.1, 1, 3]) {
      const n = 40000;
      const draws = poissonDraws(new Float64Array(n).fill(m), 7);
      let s = 0;
      let s2 = 0;
      for (const d of draws) {
        const c = cTerm(m, d);
        s += c;
        s2 += c * c;
      }
      const mean = s / n;
      const sd = Math.sqrt(s2 / n - mean * mean);
      const e = expectedCTerm(m);
      expect(Math.abs(mean - e.mean)).toBeLessThan((4 * sd) / Math.sqrt(n));
      expect(Math.abs(sd * sd - e.variance) / e.variance).toBeLessThan(0.05);
    }
  });

  it('goodness: z stays within ±4 for spectra drawn from the model itself', () => {
    const model = Float64Array.from({ length: 300 }, (_, i) => 0.2 + (i % 17));
    const ch = Int32Array.from({ length: 300 }, (_, i) => i);
    for (const seed of [1, 2, 3]) {
      const g = goodness(model, poissonDraws(model, seed), ch);
      expect(Math.abs(g.z)).toBeLessThan(4);
    }
  });
});
