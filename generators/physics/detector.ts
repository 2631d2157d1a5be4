/**
 * Probability that a photon reaching the sensor is absorbed and its charge collected.
 *
 * Model (single interaction, normal incidence): the beam decays as exp(−μ z) with μ = (μ/ρ)_total·ρ;
 * a photon whose first interaction at depth z is a photoabsorption (fraction μ_ph/μ) yields charge
 * collected with probability c(z); scattered photons are counted as lost. The sensor is a partially
 * collecting layer 0 ≤ z < p, with c(z) = c0 + (1 − c0)·z/p, followed by a fully collecting depleted
 * layer p ≤ z < p + d (c = 1). Integrating μ e^{−μz} c(z) over depth gives
 *   P = (μ_ph/μ) · [ c0·A + (1 − c0)·(A/x − e^{−x}) + e^{−x}·(1 − e^{−μd}) ],  x = μp, A = 1 − e^{−x},
 * which reduces to (μ_ph/μ)(1 − e^{−μd}) without a partial layer. Surface (dead) layers in front of
 * the sensor are transmissions handled by layers.ts.
 */
import { KilnInputError } from '../errors.ts';
import type { SensorSpec } from './types.ts';
import { materialMassAttenuationArrayCm2g } from './compound.ts';
import { CM_PER_UM, validateMaterial } from './layers.ts';
import { exp, expm1 } from '../numeric/index.ts';

/** Below this x = μp the closed form A/x − e^{−x} loses digits; its series is used instead. */
const SERIES_BELOW_X = 1e-4;

/** A/x − e^{−x} with A = 1 − e^{−x}: the mean of z/p weighted by absorption in the layer. */
function rampTerm(x: number): number {
  if (x < SERIES_BELOW_X) return x / 2 - (x * x) / 3 + (x * x * x) / 8;
  return -expm1(-x) / x - exp(-x);
}

export function validateSensor(sensor: SensorSpec): void {
  validateMaterial(sensor?.material, 'sensor');
  const d = sensor.depletionUm;
  if (typeof d !== 'number' || !Number.isFinite(d) || d <= 0) {
    throw new KilnInputError('sensor: depletion depth must be positive', { field: 'sensor.depletionUm', value: d, expected: 'a finite depth > 0 µm' });
  }
  const p = sensor.partial;
  if (p === null) return;
  if (typeof p !== 'object') {
    throw new KilnInputError('sensor: partial layer must be an object or null', { field: 'sensor.partial', value: p, expected: '{ thicknessUm, collectionAtSurface } or null' });
  }
  if (typeof p.thicknessUm !== 'number' || !Number.isFinite(p.thicknessUm) || p.thicknessUm <= 0) {
    throw new KilnInputError('sensor: partially collecting layer thickness must be positive', {
      field: 'sensor.partial.thicknessUm',
      value: p.thicknessUm,
      expected: 'a finite thickness > 0 µm (use partial: null for none)',
    });
  }
  const c0 = p.collectionAtSurface;
  if (typeof c0 !== 'number' || !(c0 >= 0 && c0 <= 1)) {
    throw new KilnInputError('sensor: collection probability at the surface must lie in [0, 1]', {
      field: 'sensor.partial.collectionAtSurface',
      value: c0,
      expected: 'a number from 0 to 1',
    });
  }
}

/**
 * Absorbed-and-collected probability at each energy (see the model above). With `allAbsorbed`,
 * every photoabsorption in the partial and the depleted layer counts (c = 1): the probability
 * that the sensor produces an event of some size, whose size the redistribution matrix describes.
 */
export function sensorAbsorption(sensor: SensorSpec, energiesKeV: Float64Array, opts: { allAbsorbed?: boolean } = {}): Float64Array {
  validateSensor(sensor);
  const muTot = materialMassAttenuationArrayCm2g(sensor.material.formula, energiesKeV, 'total');
  const muPh = materialMassAttenuationArrayCm2g(sensor.material.formula, energiesKeV, 'photo');
  const rho = sensor.material.densityGcm3;
  const dCm = sensor.depletionUm * CM_PER_UM;
  const pCm = sensor.partial ? sensor.partial.thicknessUm * CM_PER_UM : 0;
  const c0 = sensor.partial ? sensor.partial.collectionAtSurface : 1;
  const out = new Float64Array(energiesKeV.length);
  for (let j = 0; j < out.length; j++) {
    const mu = muTot[j] * rho;
    const depleted = -expm1(-mu * dCm);
    let collected: number;
    if (pCm > 0 && opts.allAbsorbed) collected = -expm1(-mu * (pCm + dCm));
    else if (pCm > 0) {
      const x = mu * pCm;
      const a = -expm1(-x);
      collected = c0 * a + (1 - c0) * rampTerm(x) + exp(-x) * depleted;
    } else collected = depleted;
    out[j] = (muPh[j] / muTot[j]) * collected;
  }
  return out;
}
