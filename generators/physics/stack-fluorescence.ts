/**
 * Si K fluorescence from the silicon-bearing surface layers in front of the sensor (gates, oxide,
 * nitride), per photon arriving at the first filter:
 *   F(E) = Σ_layers T_before(E) ∫_0^t ρ w_Si τ_Si(E) e^{−μ(E) s} · (1 − 1/J) ω_K · P(s) ds,
 * with T_before the transmission of everything in front of the layer, w_Si the layer's silicon mass
 * fraction, τ_Si silicon's photoabsorption (cm²/g), (1 − 1/J) the K-shell share of it, ω_K the
 * fluorescence yield, and P(s) the probability that the isotropic Kα photon made at depth s
 * reaches the sensor and is absorbed there:
 *   P(s) = ½ ∫_0^1 exp(−τ_after(s)/η) (1 − exp(−τ_sensor/η)) dη,  η = cos θ,
 * τ_after the Kα optical depth of the rest of the layer and the layers behind it, τ_sensor that of
 * the sensor's absorbing depth. Zero at and below the Si K edge. Radiative K emission is counted
 * at the Kα energy (Kβ, a few per cent of it in silicon, lies ~0.1 keV higher, inside the line's
 * width). Physics: standard primary-fluorescence accounting as for escape peaks (Reed & Ware 1972,
 * from memory); the integrals are Kiln's own, by Gauss–Legendre quadrature.
 */
import { massAttenuationCm2g } from './attenuation.ts';
import { composition, materialMassAttenuationCm2g } from './compound.ts';
import { contaminationTransmission } from './contamination.ts';
import { edgeEnergyKeV, element } from './elements.ts';
import { CM_PER_UM, layerTransmission } from './layers.ts';
import type { DetectorStack, LayerSpec } from './types.ts';
import { exp, expm1 } from '../numeric/index.ts';

/** 8-point Gauss–Legendre on [−1, 1] (Abramowitz & Stegun, Table 25.4). */
const GL8_NODES = [-0.960289856497536, -0.796666477413627, -0.525532409916329, -0.183434642495650, 0.183434642495650, 0.525532409916329, 0.796666477413627, 0.960289856497536];
const GL8_WEIGHTS = [0.101228536290376, 0.222381034453374, 0.313706645877887, 0.362683783378362, 0.362683783378362, 0.313706645877887, 0.222381034453374, 0.101228536290376];

function gl8(a: number, b: number, f: (x: number) => number): number {
  const h = 0.5 * (b - a);
  const m = 0.5 * (a + b);
  let s = 0;
  for (let i = 0; i < 8; i++) s += GL8_WEIGHTS[i] * f(m + h * GL8_NODES[i]);
  return s * h;
}

/** ½ ∫_0^1 e^{−a/η}(1 − e^{−b/η}) dη, the integrand smooth in η; split at 0.1 for the steep start. */
function hemisphere(after: number, sensor: number): number {
  const f = (eta: number) => exp(-after / eta) * -expm1(-sensor / eta);
  return 0.5 * (gl8(0, 0.1, f) + gl8(0.1, 1, f));
}

function opticalDepth(layer: LayerSpec, energyKeV: number, thicknessUm = layer.thicknessUm): number {
  return materialMassAttenuationCm2g(layer.material.formula, energyKeV, 'total') * layer.material.densityGcm3 * thicknessUm * CM_PER_UM;
}

function siliconShare(layer: LayerSpec): number {
  return composition(layer.material.formula).parts.find((p) => p.symbol === 'Si')?.massFraction ?? 0;
}

/** F(E), Si Kα events in the sensor per photon arriving at the first filter, at each energy. */
export function stackFluorescence(stack: DetectorStack, energiesKeV: Float64Array, dateIso: string | null): Float64Array {
  const si = element('Si');
  const edge = edgeEnergyKeV(si, 'K');
  const out = new Float64Array(energiesKeV.length);
  if (edge === null || si.kAlphaKeV === null || si.kFluorescenceYield === null || si.kJumpRatio === null) return out;
  const kAlpha = si.kAlphaKeV;
  const perKShell = (1 - 1 / si.kJumpRatio) * si.kFluorescenceYield;
  const sensorDepth =
    materialMassAttenuationCm2g(stack.sensor.material.formula, kAlpha, 'total') *
    stack.sensor.material.densityGcm3 *
    (stack.sensor.depletionUm + (stack.sensor.partial?.thicknessUm ?? 0)) *
    CM_PER_UM;
  // In front of the surface layers: filters and contamination.
  const front = new Float64Array(energiesKeV.length).fill(1);
  for (const f of stack.filters) layerTransmission(f, energiesKeV).forEach((t, j) => (front[j] *= t));
  if (stack.contamination && dateIso !== null) contaminationTransmission(stack.contamination, energiesKeV, dateIso).forEach((t, j) => (front[j] *= t));
  const layers = stack.surface;
  for (let l = 0; l < layers.length; l++) {
    const layer = layers[l];
    const wSi = siliconShare(layer);
    let behindKAlpha = 0;
    for (let m = l + 1; m < layers.length; m++) behindKAlpha += opticalDepth(layers[m], kAlpha);
    const tUm = layer.thicknessUm;
    const rho = layer.material.densityGcm3;
    const muKAlphaPerUm = opticalDepth(layer, kAlpha) / tUm;
    for (let j = 0; j < energiesKeV.length; j++) {
      const e = energiesKeV[j];
      if (wSi === 0 || !(e > edge)) continue;
      const muPerUm = opticalDepth(layer, e) / tUm;
      const tauSiPerUm = rho * wSi * massAttenuationCm2g(si, e, 'photo') * CM_PER_UM;
      const yieldInLayer = gl8(0, tUm, (s) => tauSiPerUm * exp(-muPerUm * s) * hemisphere(muKAlphaPerUm * (tUm - s) + behindKAlpha, sensorDepth));
      out[j] += front[j] * perKShell * yieldInLayer;
    }
    // photons reaching the next layer
    const t = layerTransmission(layer, energiesKeV);
    for (let j = 0; j < front.length; j++) front[j] *= t[j];
  }
  return out;
}
