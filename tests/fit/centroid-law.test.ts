/**
 * Energy-scale fit against statistics, not our own numbers: seeded synthetic centroids from a
 * known truth give pulls ~ N(0, 1) (least-squares theory, common practice, no source); the
 * covariance equals 2·H⁻¹ from a finite-difference Hessian of χ².
 */
import { describe, expect, it } from 'vitest';
import { fitCentroidLaw, centroidShiftEv, toCentroidLaw } from '../../generators/fit/centroid-law.ts';
import { KilnInputError } from '../../generators/errors.ts';
import { lineFit } from '../response/spec-fixtures.ts';
import { normalSampler } from './rng.ts';
import { finiteDifferenceCovariance, meanStd } from './fit-helpers.ts';
import type { LineFit } from '../../generators/response/model-types.ts';

// invented demo detector: gain error, offset, charge loss at the surface
const TRUE = [0.002, 3, 30, 0.6];
const ENERGIES = [0.183, 0.277, 0.392, 0.525, 0.705, 0.93, 1.254, 1.487, 2.3, 4.5, 5.899, 8.048];
const ERR_EV = 0.8;

/**
 * The energy-scale law written out, not taken from the code under test (Kiln's model statement in
 * response/model-types.ts; a charge loss at the entrance surface that fades with photon energy:
 * common practice, no source): centroid(E) − E = g·E + offset − loss·exp(−E/scale), in eV.
 */
function lawShiftEv([gainError, offsetEv, chargeLossEv, chargeLossScaleKeV]: readonly number[], eKeV: number): number {
  return gainError * eKeV * 1000 + offsetEv - chargeLossEv * Math.exp(-eKeV / chargeLossScaleKeV);
}

/** Lines drawn from the written-out law, so a wrong model cannot fit its own data back. */
function synthetic(noise: () => number): LineFit[] {
  return ENERGIES.map((e, i) =>
    lineFit(`L${i}`, e, { centroidKeV: e + (lawShiftEv(TRUE, e) + ERR_EV * noise()) / 1000, centroidErrEv: ERR_EV }),
  );
}

describe('energy-scale law against the formula', () => {
  it('centroidShiftEv equals the law written out, gain, offset and charge loss all non-zero', () => {
    for (const theta of [TRUE, [-0.004, -2, 55, 0.35], [0.01, 8, 5, 2]])
      for (const e of ENERGIES) expect(Math.abs(centroidShiftEv(theta, e) - lawShiftEv(theta, e)), `${theta} at ${e} keV`).toBeLessThan(1e-12 * (1 + Math.abs(lawShiftEv(theta, e))));
  });
});

describe('energy-scale law fit', () => {
  it('recovers noiseless parameters and returns the law in content form', () => {
    const r = fitCentroidLaw(synthetic(() => 0));
    expect(r.params.gainError).toBeCloseTo(0.002, 9);
    expect(r.params.offsetEv).toBeCloseTo(3, 6);
    expect(r.params.chargeLossEv).toBeCloseTo(30, 5);
    expect(r.params.chargeLossScaleKeV).toBeCloseTo(0.6, 6);
    expect(r.dof).toBe(ENERGIES.length - 4);
    expect(toCentroidLaw(r)).toEqual({ source: 'law', gainError: r.params.gainError, offsetEv: r.params.offsetEv, chargeLossEv: r.params.chargeLossEv, chargeLossScaleKeV: r.params.chargeLossScaleKeV });
  });

  it('with seeded noise: pulls of all four parameters ~ N(0, 1)', () => {
    const noise = normalSampler(424242);
    const pulls: number[][] = [[], [], [], []];
    const names = ['gainError', 'offsetEv', 'chargeLossEv', 'chargeLossScaleKeV'] as const;
    for (let t = 0; t < 300; t++) {
      const r = fitCentroidLaw(synthetic(noise));
      names.forEach((n, k) => pulls[k].push((r.params[n] - TRUE[k]) / r.errors[n]));
    }
    for (const p of pulls) {
      const { mean, std } = meanStd(p);
      expect(Math.abs(mean)).toBeLessThan(0.25); // nonlinear in the scale: slight bias allowed
      expect(std).toBeGreaterThan(0.85);
      expect(std).toBeLessThan(1.2);
    }
  });

  it('holds fixed parameters at their stated values with zero error', () => {
    const r = fitCentroidLaw(synthetic(normalSampler(3)), { free: ['gainError', 'offsetEv', 'chargeLossEv'], initial: { chargeLossScaleKeV: 0.6 } });
    expect(r.fixed).toEqual(['chargeLossScaleKeV']);
    expect(r.params.chargeLossScaleKeV).toBe(0.6);
    expect(r.errors.chargeLossScaleKeV).toBe(0);
    expect(r.covariance.length).toBe(3);
    expect(Math.abs(r.params.chargeLossEv - 30) / r.errors.chargeLossEv).toBeLessThan(4);
  });

  it('covariance equals 2·H⁻¹ from a finite-difference Hessian of χ² (noiseless data)', () => {
    const lines = synthetic(() => 0);
    const r = fitCentroidLaw(lines);
    const theta = [r.params.gainError, r.params.offsetEv, r.params.chargeLossEv, r.params.chargeLossScaleKeV];
    const fd = finiteDifferenceCovariance(
      { names: ['g', 'o', 'c', 's'], x: lines.map((l) => l.energyKeV), y: lines.map((l) => (l.centroidKeV - l.energyKeV) * 1000), sigma: lines.map(() => ERR_EV), initial: theta, model: centroidShiftEv },
      theta,
      [0, 1, 2, 3],
      [1e-6, 1e-3, 1e-2, 1e-4],
    );
    for (let a = 0; a < 4; a++) expect(Math.abs(r.covariance[a][a] / fd[a][a] - 1)).toBeLessThan(1e-3);
  });

  it('reports a degenerate fit (no charge loss: its scale is undetermined) and too few lines as input errors', () => {
    const flat = ENERGIES.map((e, i) => lineFit(`L${i}`, e, { centroidKeV: e * 1.001, centroidErrEv: 0.5 }));
    expect(() => fitCentroidLaw(flat, { initial: { chargeLossEv: 0 }, free: ['gainError', 'offsetEv', 'chargeLossScaleKeV'] })).toThrow(KilnInputError);
    expect(() => fitCentroidLaw(flat.slice(0, 3))).toThrow(/^centroid law: fewer data points than free parameters$/);
    expect(() => fitCentroidLaw([...flat.slice(0, 5), { ...flat[5], centroidErrEv: 0 }])).toThrow(KilnInputError);
  });
});
