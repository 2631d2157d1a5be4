/**
 * FWHM-law fit against statistics, not our own numbers: synthetic lines drawn from a known truth
 * with seeded Gaussian noise must give pulls ~ N(0, 1) and χ² ~ dof (least-squares theory, common
 * practice, no source); the covariance must equal 2·H⁻¹ from a finite-difference Hessian of χ².
 */
import { describe, expect, it } from 'vitest';
import { fitFwhmLaw, fwhmModelEv } from '../../generators/fit/fwhm-law.ts';
import { FWHM_PER_SIGMA } from '../../generators/physics/resolution.ts';
import { KilnInputError } from '../../generators/errors.ts';
import { lineFit } from '../response/spec-fixtures.ts';
import { normalSampler } from './rng.ts';
import { finiteDifferenceCovariance, meanStd } from './fit-helpers.ts';
import type { LineFit } from '../../generators/response/model-types.ts';

const W = 3.65;
const PPE = { a: 1, bPerKeV: 0.4 };
const TRUE = [4, 0.118, 0]; // readNoiseE, fano, sigma0Ev (invented demo detector)
const ENERGIES = [0.277, 0.525, 0.93, 1.487, 2.3, 3.3, 4.5, 5.899, 6.4, 8.048];
const ERR_EV = 1.5;

function synthetic(noise: () => number, scale = 1): LineFit[] {
  return ENERGIES.map((e, i) => lineFit(`L${i}`, e, { fwhmEv: fwhmModelEv(TRUE, e, W, PPE) + scale * ERR_EV * noise(), fwhmErrEv: ERR_EV }));
}

describe('FWHM law fit (weighted least squares, ml-levenberg-marquardt)', () => {
  it('recovers the parameters of noiseless data exactly, with χ² ≈ 0', () => {
    const r = fitFwhmLaw(synthetic(() => 0), { pairEnergyEv: W, pixelsPerEvent: PPE, initial: { readNoiseE: 2, fano: 0.13 } });
    expect(r.params.readNoiseE).toBeCloseTo(4, 6);
    expect(r.params.fano).toBeCloseTo(0.118, 8);
    expect(r.chi2).toBeLessThan(1e-10);
    expect(r.dof).toBe(ENERGIES.length - 2);
    expect(r.free).toEqual(['readNoiseE', 'fano']);
    expect(r.errors.sigma0Ev).toBe(0);
    expect(JSON.parse(JSON.stringify(r))).toEqual(r); // plain JSON for the site
  });

  it('with seeded noise: estimates scatter about the truth as their errors say (pulls ~ N(0, 1)), χ² ~ dof', () => {
    const noise = normalSampler(20240601);
    const pullsN: number[] = [];
    const pullsF: number[] = [];
    const chi2: number[] = [];
    for (let t = 0; t < 300; t++) {
      const r = fitFwhmLaw(synthetic(noise), { pairEnergyEv: W, pixelsPerEvent: PPE });
      pullsN.push((r.params.readNoiseE - TRUE[0]) / r.errors.readNoiseE);
      pullsF.push((r.params.fano - TRUE[1]) / r.errors.fano);
      chi2.push(r.chi2 / r.dof);
    }
    for (const pulls of [pullsN, pullsF]) {
      const { mean, std } = meanStd(pulls);
      expect(Math.abs(mean)).toBeLessThan(0.2); // 300 trials: σ(mean) ≈ 0.06
      expect(std).toBeGreaterThan(0.85);
      expect(std).toBeLessThan(1.15);
    }
    expect(Math.abs(meanStd(chi2).mean - 1)).toBeLessThan(0.1);
  });

  it('covariance (JᵀWJ)⁻¹ equals 2·H⁻¹ from a finite-difference Hessian of χ²', () => {
    for (const scale of [0, 1]) {
      const lines = synthetic(normalSampler(7), scale);
      const r = fitFwhmLaw(lines, { pairEnergyEv: W, pixelsPerEvent: PPE });
      const fd = finiteDifferenceCovariance(
        {
          names: ['readNoiseE', 'fano', 'sigma0Ev'],
          x: lines.map((l) => l.energyKeV),
          y: lines.map((l) => l.fwhmEv),
          sigma: lines.map((l) => l.fwhmErrEv),
          initial: [0, 0, 0],
          model: (t, e) => fwhmModelEv(t, e, W, PPE),
        },
        [r.params.readNoiseE, r.params.fano, r.params.sigma0Ev],
        [0, 1],
        [1e-3, 1e-5],
      );
      // noiseless: exact up to differencing (1e-4); noisy: curvature terms Σ r·∂²f are small (5 %)
      const tol = scale === 0 ? 1e-4 : 0.05;
      for (let a = 0; a < 2; a++) for (let b = 0; b < 2; b++) expect(Math.abs(r.covariance[a][b] / fd[a][b] - 1)).toBeLessThan(tol);
    }
  });

  it('can scale errors by χ²/dof on request (off by default)', () => {
    const lines = synthetic(normalSampler(11), 3); // errors understated ×3
    const plain = fitFwhmLaw(lines, { pairEnergyEv: W, pixelsPerEvent: PPE });
    const scaled = fitFwhmLaw(lines, { pairEnergyEv: W, pixelsPerEvent: PPE, scaleByReducedChi2: true });
    expect(plain.errorsScaledByReducedChi2).toBe(false);
    expect(scaled.errors.fano / plain.errors.fano).toBeCloseTo(Math.sqrt(plain.reducedChi2 as number), 6);
  });

  it('rejects a line narrower than the Fano limit, naming line, value and limit', () => {
    const lines = synthetic(() => 0);
    lines[7] = { ...lines[7], line: 'Mn-Ka', fwhmEv: 110 };
    try {
      fitFwhmLaw(lines, { pairEnergyEv: W, pixelsPerEvent: PPE, fanoForLimit: 0.115 });
      expect.unreachable();
    } catch (e) {
      const err = e as KilnInputError;
      expect(err).toBeInstanceOf(KilnInputError);
      expect(err.oneLine()).toMatch(/Mn-Ka.*got 110.*≥ 11[67]\.\d eV/);
    }
  });

  it('reports N_r and σ₀ as degenerate when pixels per event do not vary with energy', () => {
    const flat = { a: 2, bPerKeV: 0 };
    const lines = ENERGIES.map((e, i) => lineFit(`L${i}`, e, { fwhmEv: fwhmModelEv([4, 0.118, 5], e, W, flat), fwhmErrEv: 1 }));
    expect(() => fitFwhmLaw(lines, { pairEnergyEv: W, pixelsPerEvent: flat, free: ['readNoiseE', 'fano', 'sigma0Ev'], initial: { sigma0Ev: 3 } })).toThrow(
      /degenerate/,
    );
    // the FWHM/σ constant used by the model is the one the law states
    expect(fwhmModelEv([0, 0.1, 10], 1, W, flat)).toBeCloseTo(FWHM_PER_SIGMA * Math.sqrt(0.1 * W * 1000 + 100), 10);
  });
});
