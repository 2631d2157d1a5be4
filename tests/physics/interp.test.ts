import { describe, expect, it } from 'vitest';
import { logEnergyInterpolator, monotoneCubic } from '../../generators/physics/interp.ts';
import { KilnInputError } from '../../generators/errors.ts';

// Properties proved in Fritsch & Carlson, SIAM J. Numer. Anal. 17 (1980) 238–246.
describe('monotone cubic interpolation (Fritsch–Carlson 1980)', () => {
  const xs = [0, 1, 2, 3, 4, 5, 6];
  const ys = [0, 0.1, 0.15, 3, 3.05, 3.06, 10];

  it('passes through the data points', () => {
    const f = monotoneCubic(xs, ys);
    xs.forEach((x, i) => expect(f(x)).toBeCloseTo(ys[i], 14));
  });

  it('is monotone on monotone data and does not overshoot (the paper’s theorem)', () => {
    const f = monotoneCubic(xs, ys);
    let prev = -Infinity;
    for (let x = 0; x <= 6; x += 0.001) {
      const v = f(x);
      expect(v).toBeGreaterThanOrEqual(prev - 1e-12);
      prev = v;
    }
    // a step: no values outside the data range, flat parts stay flat
    const g = monotoneCubic([0, 1, 2, 3], [1, 1, 2, 2]);
    for (let x = 0; x <= 3; x += 0.01) {
      expect(g(x)).toBeGreaterThanOrEqual(1);
      expect(g(x)).toBeLessThanOrEqual(2);
    }
    expect(g(0.5)).toBe(1);
    expect(g(2.5)).toBe(2);
  });

  it('reproduces linear data exactly (tangents equal the common secant)', () => {
    const f = monotoneCubic([1, 2, 4, 7], [3, 5, 9, 15]);
    for (const x of [1.3, 2.9, 5.5, 6.99]) expect(f(x)).toBeCloseTo(2 * x + 1, 12);
  });

  it('is constant outside the data range (stated design choice)', () => {
    const f = monotoneCubic(xs, ys);
    expect(f(-5)).toBe(0);
    expect(f(100)).toBe(10);
  });

  it('in log energy: linear in ln E is reproduced; constant beyond the end lines', () => {
    const es = [0.277, 0.525, 1.487, 5.899, 8.048];
    const f = logEnergyInterpolator(es, es.map((e) => 2 + 3 * Math.log(e)));
    expect(f(3)).toBeCloseTo(2 + 3 * Math.log(3), 12);
    expect(f(0.1)).toBeCloseTo(2 + 3 * Math.log(0.277), 12);
    expect(f(12)).toBeCloseTo(2 + 3 * Math.log(8.048), 12);
  });

  it('rejects repeated or descending abscissae and non-positive energies with KilnInputError', () => {
    expect(() => monotoneCubic([0, 1, 1], [0, 1, 2], 'lineFits.energyKeV')).toThrow(KilnInputError);
    try {
      monotoneCubic([0, 2, 1], [0, 1, 2], 'lineFits.energyKeV');
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(KilnInputError);
      expect((e as KilnInputError).where.field).toBe('lineFits.energyKeV[2]');
      expect((e as KilnInputError).where.value).toBe(1);
    }
    expect(() => logEnergyInterpolator([0, 1], [1, 2])).toThrow(KilnInputError);
  });
});
