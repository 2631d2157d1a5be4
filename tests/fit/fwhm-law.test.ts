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

/**
 * The resolution law written out, not taken from the code under test: σ² = (w·N_r)²·n_pix(E) +
 * F·w·E + σ₀², n_pix = a + b·E (Fano, Phys. Rev. 72, 26 (1947) for F·w·E; read noise and Fano noise
 * added in quadrature as in Janesick, Scientific Charge-Coupled Devices, SPIE Press 2001, from
 * memory; read noise summed over the pixels of an event: common practice, no source),
 * FWHM = 2√(2 ln 2)·σ (definition of the FWHM of a Gaussian: exact mathematics).
 */
function lawFwhmEv([readNoiseE, fano, sigma0Ev]: readonly number[], eKeV: number): number {
  const npix = PPE.a + PPE.bPerKeV * eKeV;
  return 2 * Math.sqrt(2 * Math.LN2) * Math.sqrt((W * readNoiseE) ** 2 * npix + fano * W * eKeV * 1000 + sigma0Ev ** 2);
}

function synthetic(noise: () => number, scale = 1, truth: readonly number[] = TRUE): LineFit[] {
  return ENERGIES.map((e, i) => lineFit(`L${i}`, e, { fwhmEv: lawFwhmEv(truth, e) + scale * ERR_EV * noise(), fwhmErrEv: ERR_EV }));
}

describe('FWHM law against the formula (non-zero read noise)', () => {
  it('fwhmModelEv equals the law written out at every energy, with read noise, Fano and σ₀ all non-zero', () => {
    for (const theta of [[4, 0.118, 0], [7.5, 0.12, 12], [2, 0.115, 30]])
      for (const e of ENERGIES) expect(Math.abs(fwhmModelEv(theta, e, W, PPE) / lawFwhmEv(theta, e) - 1), `${theta} at ${e} keV`).toBeLessThan(1e-12);
  });

  it('the fit of noiseless lines equals the closed-form solution: FWHM²/k² is linear in E, intercept (w·N_r)²·a, slope (w·N_r)²·b + F·w', () => {
    // With σ₀ = 0 the law squared is a straight line in E: two energies fix N_r and F exactly.
    const k2 = 8 * Math.LN2;
    const [e1, e2] = [ENERGIES[1], ENERGIES[8]];
    const truth = [6.2, 0.121, 0];
    const lines = synthetic(() => 0, 0, truth);
    const y1 = lines[1].fwhmEv ** 2 / k2;
    const y2 = lines[8].fwhmEv ** 2 / k2;
    const slope = (y2 - y1) / ((e2 - e1) * 1000); // per eV
    const intercept = y1 - slope * e1 * 1000;
    const readNoise = Math.sqrt(intercept / (W * W * PPE.a));
    const fano = (slope - (W * readNoise) ** 2 * (PPE.bPerKeV / 1000)) / W;
    expect(readNoise).toBeCloseTo(6.2, 9);
    expect(fano).toBeCloseTo(0.121, 9);
    const r = fitFwhmLaw(lines, { pairEnergyEv: W, pixelsPerEvent: PPE, initial: { readNoiseE: 3, fano: 0.1 } });
    expect(Math.abs(r.params.readNoiseE - readNoise)).toBeLessThan(1e-6);
    expect(Math.abs(r.params.fano - fano)).toBeLessThan(1e-8);
  });
});

describe('FWHM law fit (weighted least squares, ml-levenberg-marquardt)', () => {
  it('recovers the parameters of noiseless data exactly, with χ² ≈ 0', () => {
    const r = fitFwhmLaw(synthetic(() => 0), { pairEnergyEv: W, pixelsPerEvent: PPE, initial: { readNoiseE: 2, fano: 0.13 } });
    // Noiseless lines drawn from the written-out law (read noise 4 e⁻): the fit returns that truth.
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

  it('fits σ₀ with N_r held (σ² is constant + linear in E: two of the three separate); covariance equals 2·H⁻¹ of χ²', () => {
    const truth = [4, 0.118, 25];
    const lines = synthetic(normalSampler(99), 1, truth);
    const r = fitFwhmLaw(lines, { pairEnergyEv: W, pixelsPerEvent: PPE, free: ['fano', 'sigma0Ev'], initial: { readNoiseE: 4, sigma0Ev: 10 } });
    const fd = finiteDifferenceCovariance(
      { names: ['readNoiseE', 'fano', 'sigma0Ev'], x: lines.map((l) => l.energyKeV), y: lines.map((l) => l.fwhmEv), sigma: lines.map((l) => l.fwhmErrEv), initial: [0, 0, 0], model: (t, e) => fwhmModelEv(t, e, W, PPE) },
      [r.params.readNoiseE, r.params.fano, r.params.sigma0Ev],
      [1, 2],
      [1e-5, 1e-3],
    );
    for (let a = 0; a < 2; a++) for (let b = 0; b < 2; b++) expect(Math.abs(r.covariance[a][b] / fd[a][b] - 1), `cov[${a}][${b}]`).toBeLessThan(0.05);
    expect(Math.abs(r.params.fano - truth[1]) / r.errors.fano).toBeLessThan(4);
    expect(Math.abs(r.params.sigma0Ev - truth[2]) / r.errors.sigma0Ev).toBeLessThan(4);
  });

  it('keeps F below 1 (Poisson statistics, F = 1, bound the ionisation noise: Fano, Phys. Rev. 72, 26 (1947), from memory)', () => {
    const r = fitFwhmLaw(synthetic(() => 0, 0, [4, 1.5, 0]), { pairEnergyEv: W, pixelsPerEvent: PPE });
    expect(Math.abs(r.params.fano - (1 - 1e-6))).toBeLessThan(1e-9);
  });

  it('names the FWHM law in its errors', () => {
    const lines = synthetic(() => 0);
    expect(() => fitFwhmLaw(lines.slice(0, 1), { pairEnergyEv: W, pixelsPerEvent: PPE })).toThrow(/^FWHM law: fewer data points than free parameters$/);
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
