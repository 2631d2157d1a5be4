/**
 * Line-profile components against mathematics, not our own numbers: densities against direct
 * numerical convolution, CDFs against numerical integration of the densities, and the moments of
 * an exponentially modified Gaussian (mean c − τ, variance σ² + τ²: sum of independent variables,
 * common practice, no source).
 */
import { describe, expect, it } from 'vitest';
import {
  componentCdf,
  detectedCdf,
  emgLowTailCdf,
  emgLowTailPdf,
  gaussianPdf,
  profileCdf,
  profileComponents,
  shelfCdf,
  shelfPdf,
  thresholdLoss,
  type ProfileParams,
} from '../../generators/physics/profile.ts';
import { normalPdf } from '../../generators/physics/special.ts';
import { KilnInputError } from '../../generators/errors.ts';

/** Composite Simpson rule (numerical reference, independent of the closed forms). */
function simpson(f: (x: number) => number, a: number, b: number, n = 20000): number {
  const h = (b - a) / n;
  let s = f(a) + f(b);
  for (let i = 1; i < n; i++) s += (i % 2 ? 4 : 2) * f(a + i * h);
  return (s * h) / 3;
}

const CASES = [
  { s: 0.05, tau: 0.04 }, // comparable widths
  { s: 0.05, tau: 0.0005 }, // tail much narrower than σ: EMG → Gaussian shifted by τ
  { s: 0.01, tau: 0.3 }, // long tail
];

describe('exponentially modified Gaussian (low-energy tail)', () => {
  it('density equals the direct convolution of the exponential with the Gaussian (numerical)', () => {
    for (const { s, tau } of CASES)
      for (const u of [-0.4, -0.1, -0.02, 0, 0.03, 0.1]) {
        const conv = simpson((y) => (Math.exp(-y / tau) / tau) * (normalPdf((u + y) / s) / s), 0, Math.max(40 * tau, 1e-9) , 40000);
        const got = emgLowTailPdf(u, 0, s, tau);
        expect(Math.abs(got - conv)).toBeLessThan(1e-6 * Math.max(1, conv));
      }
  });

  it('CDF equals the numerical integral of its density', () => {
    for (const { s, tau } of CASES) {
      const lo = -40 * tau - 10 * s;
      for (const x of [-0.5, -0.1, -0.03, 0, 0.02, 0.2]) {
        const num = x <= lo ? 0 : simpson((t) => emgLowTailPdf(t, 0, s, tau), lo, x, 40000);
        expect(Math.abs(emgLowTailCdf(x, 0, s, tau) - num)).toBeLessThan(2e-8);
      }
    }
  });

  it('has mean c − τ and variance σ² + τ² (moments of a sum of independent variables)', () => {
    const s = 0.03;
    const tau = 0.05;
    const c = 1;
    const m1 = simpson((x) => x * emgLowTailPdf(x, c, s, tau), c - 3, c + 0.5, 60000);
    const m2 = simpson((x) => (x - (c - tau)) ** 2 * emgLowTailPdf(x, c, s, tau), c - 3, c + 0.5, 60000);
    expect(m1).toBeCloseTo(c - tau, 8);
    expect(m2).toBeCloseTo(s * s + tau * tau, 8);
  });

  it('stays finite and in [0, 1] far in both tails (no overflow)', () => {
    for (const { s, tau } of [...CASES, { s: 0.05, tau: 1e-6 }])
      for (const u of [-1e3, -50, -5, -1, 1, 5, 50]) {
        const v = emgLowTailCdf(u, 0, s, tau);
        expect(Number.isFinite(v)).toBe(true);
        expect(v).toBeGreaterThanOrEqual(0);
        expect(v).toBeLessThanOrEqual(1 + 1e-15);
      }
  });

  it('fast windowed CDF agrees with the full formula', () => {
    for (const { s, tau } of CASES) {
      const G = componentCdf({ kind: 'tail', fraction: 1, centroidKeV: 2, sigmaKeV: s, scaleKeV: tau });
      for (let x = 0; x < 3; x += 0.0137) expect(Math.abs(G(x) - emgLowTailCdf(x, 2, s, tau))).toBeLessThan(1e-14);
    }
  });
});

describe('shelf (flat to the centroid, smoothed by the Gaussian)', () => {
  it('CDF equals the numerical integral of its density; density equals the direct convolution', () => {
    const lo = 0.1;
    const hi = 1.2;
    const s = 0.03;
    for (const x of [0.05, 0.1, 0.15, 0.6, 1.15, 1.2, 1.3]) {
      const num = simpson((t) => shelfPdf(t, lo, hi, s), lo - 0.5, x, 40000);
      expect(Math.abs(shelfCdf(x, lo, hi, s) - num)).toBeLessThan(1e-9);
      const conv = simpson((t) => gaussianPdf(x, t, s) / (hi - lo), lo, hi, 40000);
      expect(Math.abs(shelfPdf(x, lo, hi, s) - conv)).toBeLessThan(1e-7);
    }
  });
});

describe('profile mixture', () => {
  const p: ProfileParams = {
    centroidKeV: 3,
    sigmaKeV: 0.05,
    tailFraction: 0.05,
    tailScaleKeV: 0.04,
    shelfFraction: 0.01,
    escapeFraction: 0.01,
    fluorescenceFraction: 0.002,
  };
  const ctx = { shelfLowKeV: 0, escape: { centroidKeV: 1.26, sigmaKeV: 0.035 }, fluorescence: { centroidKeV: 1.74, sigmaKeV: 0.04 } };

  it('fractions sum to 1 before the threshold, and the CDF rises 0 → 1', () => {
    const comps = profileComponents(p, ctx);
    expect(comps.map((c) => c.kind)).toEqual(['gaussian', 'tail', 'shelf', 'gaussian', 'gaussian']);
    expect(comps.reduce((s, c) => s + c.fraction, 0)).toBeCloseTo(1, 15);
    expect(profileCdf(comps, -10)).toBe(0);
    expect(profileCdf(comps, 100)).toBeCloseTo(1, 15);
  });

  it('events below the threshold are lost: detected total = 1 − loss', () => {
    const comps = profileComponents({ ...p, centroidKeV: 0.3, sigmaKeV: 0.06 }, ctx);
    const loss = thresholdLoss(comps, 0.2);
    expect(loss).toBeGreaterThan(0.02);
    expect(detectedCdf(comps, 0.2, 100) + loss).toBeCloseTo(1, 14);
    expect(detectedCdf(comps, 0.2, 0.19)).toBe(0);
  });

  it('rejects fractions that sum above 1 or lie outside [0, 1]', () => {
    expect(() => profileComponents({ ...p, tailFraction: 0.7, shelfFraction: 0.4 }, ctx)).toThrow(KilnInputError);
    expect(() => profileComponents({ ...p, shelfFraction: -0.1 }, ctx)).toThrow(KilnInputError);
    expect(() => profileComponents({ ...p, sigmaKeV: 0 }, ctx)).toThrow(KilnInputError);
  });
});
