/**
 * Seeded Poisson draws: sample mean and variance within their expected scatter (a Poisson
 * variable has mean = variance = λ and fourth central moment λ(1 + 3λ): textbook facts, e.g.
 * Johnson, Kemp & Kotz, Univariate Discrete Distributions, ch. 4), on both sides of the switch
 * between the two generators; the same seed gives the same numbers.
 */
import { describe, expect, it } from 'vitest';
import { logFactorial, poissonDraws } from '../../generators/spectrum/index.ts';

describe('Poisson draws', () => {
  for (const lambda of [0.05, 0.7, 5, 29.5, 30.5, 120, 5000]) {
    it(`λ = ${lambda}: mean and variance within 4 standard errors`, () => {
      const n = 50000;
      const x = poissonDraws(new Float64Array(n).fill(lambda), 1234 + Math.round(lambda * 10));
      let s = 0;
      for (const v of x) s += v;
      const mean = s / n;
      let s2 = 0;
      for (const v of x) s2 += (v - mean) ** 2;
      const variance = s2 / (n - 1);
      expect(x.every((v) => Number.isInteger(v) && v >= 0)).toBe(true);
      expect(Math.abs(mean - lambda)).toBeLessThan(4 * Math.sqrt(lambda / n));
      // SE of the sample variance: √((μ4 − σ⁴)/n) with μ4 = λ(1 + 3λ), σ⁴ = λ².
      expect(Math.abs(variance - lambda)).toBeLessThan(4 * Math.sqrt((lambda + 2 * lambda * lambda) / n));
    });
  }

  it('same seed, same draws; another seed, other draws', () => {
    const m = Float64Array.from({ length: 500 }, (_, i) => i / 7);
    expect(Array.from(poissonDraws(m, 42))).toEqual(Array.from(poissonDraws(m, 42)));
    expect(Array.from(poissonDraws(m, 43))).not.toEqual(Array.from(poissonDraws(m, 42)));
  });

  it('log k! matches the exact sum of logs (arithmetic)', () => {
    let exact = 0;
    for (let k = 1; k <= 200; k++) {
      exact += Math.log(k);
      expect(Math.abs(logFactorial(k) - exact)).toBeLessThan(1e-10 * Math.max(1, exact));
    }
  });
});
