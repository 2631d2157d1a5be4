/**
 * The atomic data the escape-peak and fluorescence terms need, taken from the committed
 * interaction table (generators/physics/data, imported from xraylib) for the sensor's element.
 */
import { KilnInputError } from '../errors.ts';
import { massAttenuationCm2g } from './attenuation.ts';
import { edgeEnergyKeV, element } from './elements.ts';
import type { EscapeInputs } from './escape.ts';

/** Escape inputs for a single-element sensor material (silicon in practice). */
export function escapeInputsFor(symbol = 'Si'): EscapeInputs {
  const el = element(symbol);
  const kEdgeKeV = edgeEnergyKeV(el, 'K');
  if (el.kFluorescenceYield === null || el.kJumpRatio === null || el.kAlphaKeV === null || kEdgeKeV === null)
    throw new KilnInputError('no K-shell data for the sensor element', { field: 'sensor.material.formula', value: symbol, expected: 'an element with a K edge in the table' });
  return {
    fluorescenceYield: el.kFluorescenceYield,
    jumpRatio: el.kJumpRatio,
    kEdgeKeV,
    kAlphaKeV: el.kAlphaKeV,
    // Photoabsorption governs where the photon and the fluorescence photon are absorbed.
    attenuation: (energyKeV: number) => massAttenuationCm2g(el, energyKeV, 'photo'),
  };
}
