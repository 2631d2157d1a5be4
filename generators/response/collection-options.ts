/**
 * What the redistribution spec implies for the effective area: with the partial-charge model the
 * ARF counts every absorbed photon (the matrix redistributes the partial ones); with the stack's
 * Si fluorescence the ARF also counts the fluorescence photons the sensor absorbs.
 */
import type { EfficiencyOptions } from '../physics/efficiency.ts';
import type { RedistributionSpec } from './model-types.ts';

export function efficiencyOptionsFor(spec: RedistributionSpec): EfficiencyOptions {
  return spec.tail.source === 'collection' ? { partialChargeInMatrix: true } : {};
}

export function countsStackFluorescence(spec: RedistributionSpec): boolean {
  return spec.siFluorescenceSource === 'stack';
}
