/**
 * A matrix input that can cross to another thread or process (structured clone, JSON): the
 * silicon data hold a function (μ(E)), so they are named by the sensor's element and looked up
 * from the committed table where the matrix is built. Pure.
 */
import { escapeInputsFor } from '../physics/escape-inputs.ts';
import type { RedistributionInput } from './redistribution.ts';

export interface PortableRedistributionInput extends Omit<RedistributionInput, 'silicon' | 'onProgress'> {
  /** Sensor element whose K-shell data the escape peak and fluorescence need (physics/escape-inputs.ts); absent = none. */
  siliconElement?: string;
}

/** The input as a thread builds from it. */
export function localInput(input: PortableRedistributionInput): Omit<RedistributionInput, 'onProgress'> {
  const { siliconElement, ...rest } = input;
  return { ...rest, silicon: siliconElement === undefined ? undefined : escapeInputsFor(siliconElement) };
}
